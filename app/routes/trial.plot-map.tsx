import { Form, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { plotCount, setMapBearing } from "~/.server/design/layout";
import { requiredNumber } from "~/.server/design/inputs";
import { getTrial } from "~/.server/design/trials";
import { parseForm, readForm } from "~/.server/forms";
import { notFound, requirePermission } from "~/.server/permissions";
import { cacheResponse } from "~/.server/response-cache";
import { buttonClass, Field, FormMessage, SubmitButton } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { Caution } from "~/components/more-fields";
import { PlotMapPanel } from "~/components/plot-map-panel";
import { BURIED_UTILITIES_CAUTION } from "~/design/cautions";
import { orientationText } from "~/design/plot-map";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/trial.plot-map";

export const meta: Route.MetaFunction = () => [{ title: "Plot map · Tilthmark" }];

// Read-only for GET: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const trial = await getTrial(params.trialId);
  if (!trial) notFound(request, "No such trial.");
  return {
    trial: { id: trial.id, status: trial.status, seed: trial.randomizationSeed, mapBearingDeg: trial.mapBearingDeg },
    plots: await plotCount(trial.id),
    canTurn: roleCan(member.role, "trials.edit"),
  };
}

const Bearing = z.object({ mapBearingDeg: requiredNumber("The bearing", { min: 0, max: 359, integer: true }) });

/** Sets which way the map's top faces in the field; the layout itself is not touched, so this is allowed after locking. */
export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "trials.edit");
  const parsed = parseForm(await readForm(request), Bearing);
  if (!parsed.ok) return parsed.response;
  await setMapBearing(member.user.id, params.trialId, parsed.data.mapBearingDeg);
  return { ok: `The map now shows the ${orientationText(parsed.data.mapBearingDeg)}.` };
}

export default function PlotMapPage() {
  const { trial, plots, canTurn } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const { ok, message } = outcomeOf(result);
  const bearing = formState(result);
  return (
    <>
      <div aria-live="polite" className="no-print mb-4 flex flex-col gap-2 empty:hidden">
        {ok && <FormMessage tone="success">{ok}</FormMessage>}
        {message && <FormMessage>{message}</FormMessage>}
      </div>
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
      {plots > 0 && (
        <div className="mb-4">
          <Caution title="Before staking out plots">
            <p>{BURIED_UTILITIES_CAUTION}</p>
          </Caution>
        </div>
      )}
      <PlotMapPanel trialId={trial.id} version={`${trial.seed}-${plots}-${trial.status}-${trial.mapBearingDeg}`} />
      {plots > 0 && canTurn && (
        <Form method="post" className="no-print mt-6 flex max-w-xl flex-wrap items-end gap-3 rounded-lg border border-loam-200 bg-white p-4" aria-label="Map orientation">
          <div className="min-w-56 flex-1">
            <Field
              label="Top of the map faces (° from true north)"
              name="mapBearingDeg"
              inputMode="numeric"
              defaultValue={bearing.values?.mapBearingDeg ?? String(trial.mapBearingDeg)}
              errors={bearing.errors}
              hint="The compass bearing you face standing at the map's bottom edge looking to its top: 0 for north, 90 for east. Only the north arrow turns; the layout stays as drawn."
            />
          </div>
          <SubmitButton pendingLabel="Saving…">Save orientation</SubmitButton>
        </Form>
      )}
    </>
  );
}
