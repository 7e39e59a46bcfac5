import { applicationSheet, applicationSheetCsv, unitsFor } from "~/.server/design/application-sheet";
import { csvResponse } from "~/.server/csv";
import { getTrial } from "~/.server/design/trials";
import { notFound, requirePermission } from "~/.server/permissions";
import type { Route } from "./+types/download.application-sheet-csv";

/** The application sheet as CSV: one row per plot and application, numbers as numbers. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const trial = await getTrial(params.trialId);
  if (!trial) notFound(request, "No such trial.");
  const units = unitsFor(request, member.user.unitSystem);
  const sheet = await applicationSheet(trial.id, units);
  if (!sheet) notFound(request, "This trial has no layout yet: randomize it first.");
  const slug = trial.title.replace(/[^A-Za-z0-9]+/g, "-").replace(/^-|-$/g, "").slice(0, 60) || "trial";
  return csvResponse(`application-sheet-${slug}-${units}.csv`, applicationSheetCsv(sheet));
}
