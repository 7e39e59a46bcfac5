// Fills the demo trial's lab results through lab intake itself: sampling events and sample codes,
// then for every event an LOI and a BD file built as CSV text, received, checked and committed.
import { demoDepths, demoLabRows, demoSamplingEvents } from "../../../datasets/demo/measurements";
import { toCsv } from "../csv";
import { createSamplingEvent, listEventSamples } from "./events";
import { commitUpload, receiveUpload } from "./uploads";

export async function seedDemoMeasurements(input: { programId: string; trialId: string; technicianId: string; researcherId: string }) {
  const { programId, trialId, technicianId, researcherId } = input;
  for (const [eventIndex, e] of demoSamplingEvents.entries()) {
    const { eventId, eventCode } = await createSamplingEvent(trialId, researcherId, {
      seasonLabel: e.seasonLabel,
      eventDate: e.eventDate,
      isBaseline: e.isBaseline,
      depths: demoDepths,
      variables: ["loi", "bd"],
    });
    const samples = (await listEventSamples(eventId)).map((s) => ({ ...s }));
    const rows = demoLabRows(samples, eventIndex);
    for (const kind of ["loi", "bd"] as const) {
      const table = rows[kind] as unknown as Record<string, string | number>[];
      const header = Object.keys(table[0]);
      const csv = toCsv([header, ...table.map((r) => header.map((h) => r[h]))]);
      const { uploadId } = await receiveUpload({
        trialId,
        programId,
        actorId: technicianId,
        kind,
        filename: `${eventCode.toLowerCase()}-${kind}-${e.eventDate}.csv`,
        contentType: "text/csv",
        bytes: new TextEncoder().encode(csv),
        decimalComma: false,
      });
      await commitUpload(trialId, programId, technicianId, uploadId, { confirmWarnings: true });
    }
  }
}
