import { useLoaderData } from "react-router";
import { plotCount } from "~/.server/design/layout";
import { getTrial } from "~/.server/design/trials";
import { notFound, requirePermission } from "~/.server/permissions";
import { cacheResponse } from "~/.server/response-cache";
import { buttonClass } from "~/components/form";
import { PlotMapPanel } from "~/components/plot-map-panel";
import type { Route } from "./+types/trial.plot-map";

export const meta: Route.MetaFunction = () => [{ title: "Plot map · Tilthmark" }];

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "results.view");
  const trial = await getTrial(params.trialId);
  if (!trial) notFound(request, "No such trial.");
  return {
    trial: { id: trial.id, status: trial.status, seed: trial.randomizationSeed },
    plots: await plotCount(trial.id),
  };
}

export default function PlotMapPage() {
  const { trial, plots } = useLoaderData<typeof loader>();
  return (
    <>
      {plots > 0 && (
        <div className="no-print mb-4 flex flex-wrap items-center gap-3">
          <button type="button" className={buttonClass("secondary")} onClick={() => window.print()}>
            Print plot map
          </button>
          <a href={`/trials/${trial.id}/plot-map.svg`} download className={buttonClass("secondary")}>
            Download SVG
          </a>
          {trial.status === "draft" && (
            <p className="text-sm text-clay-800">Draft layout: it may still be re-randomized. Stake out plots only after the design is locked.</p>
          )}
        </div>
      )}
      <PlotMapPanel trialId={trial.id} version={`${trial.seed}-${plots}-${trial.status}`} />
    </>
  );
}
