import { requirePermission } from "~/.server/permissions";
import { seasonMeansChart } from "~/.server/results/charts";
import { parseResultsQuery, ResultsError } from "~/.server/results/service";
import { cacheResponse } from "~/.server/response-cache";
import type { Route } from "./+types/api.trial-chart-season-means";

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

/** Treatment means ± SE over seasons for the selected variable and depth (shape: `SeasonMeansChart`). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "results.view");
  const parsed = parseResultsQuery(new URL(request.url));
  if (!parsed.ok) return Response.json({ error: parsed.message }, { status: 400 });
  try {
    return Response.json(await seasonMeansChart(params.trialId, parsed.query));
  } catch (error) {
    if (error instanceof ResultsError) return Response.json({ error: error.message }, { status: 400 });
    throw error;
  }
}
