import { chartResponse } from "~/.server/results/chart-route";
import { depthProfileChart } from "~/.server/results/charts";
import { cacheResponse } from "~/.server/response-cache";
import type { Route } from "./+types/api.trial-chart-depth-profile";

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

/** Treatment means ± SE per depth increment in one season (shape: `DepthProfileChart`). */
export async function loader({ request, params }: Route.LoaderArgs) {
  return chartResponse(request, params.trialId, (query) => depthProfileChart(params.trialId, query));
}
