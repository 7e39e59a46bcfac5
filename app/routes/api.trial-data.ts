import { csvResponse } from "~/.server/csv";
import { requirePermission } from "~/.server/permissions";
import { dataCsvRows } from "~/.server/intake/data-table";
import type { Route } from "./+types/api.trial-data";

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "results.view");
  const q = new URL(request.url).searchParams;
  const rows = await dataCsvRows(params.trialId, {
    eventId: q.get("event") || undefined,
    treatment: q.get("treatment") || undefined,
    depth: q.get("depth") || undefined,
    excludedOnly: q.get("excluded") === "1",
  });
  return csvResponse(`trial-data-${new Date().toISOString().slice(0, 10)}.csv`, rows);
}
