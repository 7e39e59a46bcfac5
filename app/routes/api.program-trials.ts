import { requirePermission } from "~/.server/permissions";
import { listTrials } from "~/.server/trials";
import { cacheResponse } from "~/.server/response-cache";
import type { Route } from "./+types/api.program-trials";

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

/** JSON list of a program's trials, for scripts and the browser. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { programId: params.programId }, "results.view");
  const trials = await listTrials(params.programId);
  return Response.json({ trials });
}
