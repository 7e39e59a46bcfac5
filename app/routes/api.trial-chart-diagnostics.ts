import { chartResponse } from "~/.server/results/chart-route";
import { diagnosticsChart } from "~/.server/results/charts";
import { cacheResponse } from "~/.server/response-cache";
import type { Route } from "./+types/api.trial-chart-diagnostics";

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

/** Residuals vs fitted and normal Q–Q of the per-season ANOVA (shape: `DiagnosticsChart`). */
export async function loader({ request, params }: Route.LoaderArgs) {
  return chartResponse(request, params.trialId, (query) => diagnosticsChart(params.trialId, query));
}
