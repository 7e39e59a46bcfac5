import { chartResponse } from "~/.server/results/chart-route";
import { stocksChart } from "~/.server/results/charts";
import { cacheResponse } from "~/.server/response-cache";
import type { Route } from "./+types/api.trial-chart-stocks";

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

/** SOC stocks by treatment, fixed depth and equivalent soil mass side by side (shape: `StocksChart`). */
export async function loader({ request, params }: Route.LoaderArgs) {
  return chartResponse(request, params.trialId, (query) => stocksChart(params.trialId, query));
}
