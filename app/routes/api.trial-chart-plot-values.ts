import { chartResponse } from "~/.server/results/chart-route";
import { plotValuesChart } from "~/.server/results/charts";
import { cacheResponse } from "~/.server/response-cache";
import type { Route } from "./+types/api.trial-chart-plot-values";

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

/** Every plot's value by treatment and block in one season, with the treatment means (shape: `PlotValuesChart`). */
export async function loader({ request, params }: Route.LoaderArgs) {
  return chartResponse(request, params.trialId, (query) => plotValuesChart(params.trialId, query));
}
