import { chartResponse } from "~/.server/results/chart-route";
import { depthProfileChart } from "~/.server/results/charts";
import type { Route } from "./+types/api.trial-chart-depth-profile";

/** Treatment means ± SE per depth increment in one season (shape: `DepthProfileChart`). */
export async function loader({ request, params }: Route.LoaderArgs) {
  return chartResponse(request, params.trialId, (query) => depthProfileChart(params.trialId, query));
}
