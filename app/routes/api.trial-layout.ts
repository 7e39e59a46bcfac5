import { plotMapData } from "~/.server/design/layout";
import { notFound, requirePermission } from "~/.server/permissions";
import { cacheResponse } from "~/.server/response-cache";
import type { Route } from "./+types/api.trial-layout";

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

/** JSON for the plot map: the trial's geometry, treatments and plots (empty until randomized). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const data = await plotMapData(params.trialId, member.user.unitSystem);
  if (!data) notFound(request, "No such trial.");
  return Response.json(data, { headers: { "Cache-Control": "private, no-store" } });
}
