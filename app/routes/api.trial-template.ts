import { csvResponse } from "~/.server/csv";
import { notFound, requirePermission } from "~/.server/permissions";
import { kindOf } from "~/.server/intake/context";
import { IntakeError } from "~/.server/intake/errors";
import { getEvent } from "~/.server/intake/events";
import { templateRows } from "~/.server/intake/sheets";
import type { Route } from "./+types/api.trial-template";

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "measurements.upload");
  const query = new URL(request.url).searchParams;
  const event = await getEvent(params.trialId, query.get("event") ?? "");
  if (!event) notFound(request, "No such sampling event in this trial.");
  try {
    const { kind } = await kindOf(member.programId, query.get("kind") ?? "");
    return csvResponse(`${kind.id}-template-${event.code}-${event.eventDate}.csv`, await templateRows(event.id, kind));
  } catch (error) {
    if (error instanceof IntakeError) notFound(request, error.message);
    throw error;
  }
}
