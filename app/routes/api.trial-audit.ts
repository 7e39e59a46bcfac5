import { csvResponse } from "~/.server/csv";
import { requirePermission } from "~/.server/permissions";
import { auditCsvRows } from "~/.server/intake/audit-log";
import type { Route } from "./+types/api.trial-audit";

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "results.view");
  const q = new URL(request.url).searchParams;
  const rows = await auditCsvRows(params.trialId, {
    action: q.get("action") || undefined,
    actorId: q.get("actor") || undefined,
    from: q.get("from") || undefined,
    to: q.get("to") || undefined,
    text: q.get("text") || undefined,
  });
  return csvResponse(`audit-log-${new Date().toISOString().slice(0, 10)}.csv`, rows);
}
