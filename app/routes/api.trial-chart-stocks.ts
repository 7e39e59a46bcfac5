import { chartResponse } from "~/.server/results/chart-route";
import { stocksChart } from "~/.server/results/charts";
import type { Route } from "./+types/api.trial-chart-stocks";

/** SOC stocks by treatment, fixed depth and equivalent soil mass side by side (shape: `StocksChart`). */
export async function loader({ request, params }: Route.LoaderArgs) {
  return chartResponse(request, params.trialId, (query) => stocksChart(params.trialId, query));
}
