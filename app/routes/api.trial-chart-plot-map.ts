import { chartResponse } from "~/.server/results/chart-route";
import { plotMapChart } from "~/.server/results/charts";
import { ResultsError } from "~/.server/results/service";
import { cacheResponse } from "~/.server/response-cache";
import type { Route } from "./+types/api.trial-chart-plot-map";

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

/**
 * The plot map coloured by value (`show=values`, the default) or by residual from the per-season
 * ANOVA (`show=residuals`) (shape: `PlotMapChart`).
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  return chartResponse(request, params.trialId, (query, url) => {
    const show = url.searchParams.get("show") || "values";
    if (show !== "values" && show !== "residuals") throw new ResultsError("show is values or residuals.");
    return plotMapChart(params.trialId, query, show);
  });
}
