import { chartResponse } from "~/.server/results/chart-route";
import { plotValuesChart } from "~/.server/results/charts";
import type { Route } from "./+types/api.trial-chart-plot-values";

/** Every plot's value by treatment and block in one season, with the treatment means (shape: `PlotValuesChart`). */
export async function loader({ request, params }: Route.LoaderArgs) {
  return chartResponse(request, params.trialId, (query) => plotValuesChart(params.trialId, query));
}
