import { requirePermission } from "~/.server/permissions";
import { listTrials } from "~/.server/trials";
import type { Route } from "./+types/api.program-trials";

/** JSON list of a program's trials, for scripts and the browser. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { programId: params.programId }, "results.view");
  const trials = await listTrials(params.programId);
  return Response.json({ trials });
}
