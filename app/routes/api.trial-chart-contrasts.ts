import { chartResponse } from "~/.server/results/chart-route";
import { contrastsChart } from "~/.server/results/charts";
import { cacheResponse } from "~/.server/response-cache";
import type { Route } from "./+types/api.trial-chart-contrasts";

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

/** The saved contrasts' estimates with confidence intervals in the selected analysis (shape: `ContrastsChart`). */
export async function loader({ request, params }: Route.LoaderArgs) {
  return chartResponse(request, params.trialId, (query) => contrastsChart(params.trialId, query));
}
