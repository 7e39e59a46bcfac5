import { requirePermission } from "~/.server/permissions";
import { parseResultsQuery, ResultsError, trialResults } from "~/.server/results/service";
import { cacheResponse } from "~/.server/response-cache";
import type { Route } from "./+types/api.trial-results";

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

/** The analysis of one selection as JSON (shape: `ResultsView` in app/.server/results/service.ts). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "results.view");
  const parsed = parseResultsQuery(new URL(request.url));
  if (!parsed.ok) return Response.json({ error: parsed.message }, { status: 400 });
  try {
    return Response.json(await trialResults(params.trialId, parsed.query));
  } catch (error) {
    if (error instanceof ResultsError) return Response.json({ error: error.message, missing: error.missing }, { status: 400 });
    throw error;
  }
}
