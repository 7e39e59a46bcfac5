import { csvResponse } from "~/.server/csv";
import { notFound, requirePermission } from "~/.server/permissions";
import { getEvent } from "~/.server/intake/events";
import { sampleSheetRows } from "~/.server/intake/sheets";
import type { Route } from "./+types/api.trial-sample-sheet";

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "samples.edit");
  const event = await getEvent(params.trialId, new URL(request.url).searchParams.get("event") ?? "");
  if (!event) notFound(request, "No such sampling event in this trial.");
  return csvResponse(`sample-sheet-${event.code}-${event.eventDate}.csv`, await sampleSheetRows(event));
}
