import { renderToStaticMarkup } from "react-dom/server";
import { plotMapData } from "~/.server/design/layout";
import { notFound, requirePermission } from "~/.server/permissions";
import { PlotMapSvg } from "~/components/plot-map";
import type { Route } from "./+types/download.plot-map-svg";

/** The plot map as a standalone SVG file, drawn by the same component as the page. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const data = await plotMapData(params.trialId, member.user.unitSystem);
  if (!data) notFound(request, "No such trial.");
  if (data.plots.length === 0) notFound(request, "This trial has no layout yet: randomize it first.");
  const svg = `<?xml version="1.0" encoding="UTF-8"?>\n${renderToStaticMarkup(<PlotMapSvg data={data} />)}\n`;
  const name = `plot-map-${data.trial.title.replace(/[^A-Za-z0-9]+/g, "-").replace(/^-|-$/g, "").slice(0, 60) || "trial"}.svg`;
  return new Response(svg, {
    headers: {
      "Content-Type": "image/svg+xml; charset=utf-8",
      "Content-Disposition": `attachment; filename="${name}"`,
      "Cache-Control": "private, no-store",
    },
  });
}
