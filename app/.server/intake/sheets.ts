// Sample sheets and lab templates as CSV rows (header first), for csvResponse.
import type { CsvCell } from "../csv";
import { listEventSamples } from "./events";
import type { KindDef } from "./kinds";

export async function sampleSheetRows(event: { id: string; season: string; eventDate: string; code: string }): Promise<CsvCell[][]> {
  const samples = await listEventSamples(event.id);
  return [
    ["sample_code", "event", "season", "event_date", "plot", "block", "treatment_code", "treatment", "top_cm", "bottom_cm"],
    ...samples.map((s) => [s.code, event.code, event.season, event.eventDate, s.plotNumber, s.block, s.treatmentCode, s.treatmentName, s.topCm, s.bottomCm]),
  ];
}

/** A template for one kind of result: Tilthmark's column names, one row per sample code of the event. */
export async function templateRows(eventId: string, kind: KindDef): Promise<CsvCell[][]> {
  const samples = await listEventSamples(eventId);
  return [kind.fields.map((f) => f.header), ...samples.map((s) => kind.fields.map((f) => (f.key === "sampleCode" ? s.code : null)))];
}
