// Reading a compost probe log: pure, so the whole file is checked before anything is stored.
import Papa from "papaparse";

export type ReadingInput = { readAt: string; probeC: number; turned: boolean };

const DATE_TIME = /^(\d{4}-\d{2}-\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2}))?)?$/;

/** "2025-06-01 08:30" → a Date holding that wall-clock time (stored without a time zone), or null. */
export function parseLogDateTime(text: string): Date | null {
  const m = DATE_TIME.exec(text.trim());
  if (!m) return null;
  const iso = `${m[1]}T${m[2] ?? "00"}:${m[3] ?? "00"}:${m[4] ?? "00"}Z`;
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) || d.toISOString().slice(0, 10) !== m[1] ? null : d;
}

const TURNED_YES = new Set(["yes", "y", "true", "1", "turned", "x"]);
const TURNED_NO = new Set(["", "no", "n", "false", "0"]);

const HEADER_ALIASES: Record<"readAt" | "probeC" | "turned", string[]> = {
  readAt: ["read_at", "date_time", "datetime", "date time", "date", "time", "timestamp", "taken_at"],
  probeC: ["probe_c", "temperature_c", "temp_c", "temperature", "temp", "probe", "°c", "degc"],
  turned: ["turned", "turning", "turn", "turned?"],
};

/**
 * Reads a temperature log CSV (columns: date-time, probe °C, turned yes/no). Returns the rows, or
 * the problems by row so nothing is stored until the whole file reads cleanly.
 */
export function parseTemperatureCsv(text: string): { rows: ReadingInput[]; problems: string[] } {
  const parsed = Papa.parse<Record<string, string>>(text.replace(/^\uFEFF/, "").trim(), {
    header: true,
    skipEmptyLines: "greedy",
    transformHeader: (h) => h.trim().toLowerCase(),
  });
  const headers = parsed.meta.fields ?? [];
  const column = (key: keyof typeof HEADER_ALIASES) => headers.find((h) => HEADER_ALIASES[key].includes(h));
  const readAtCol = column("readAt");
  const probeCol = column("probeC");
  const turnedCol = column("turned");
  const problems: string[] = [];
  if (!readAtCol) problems.push(`No date-time column: name one “read_at” (found ${headers.join(", ") || "no header"}).`);
  if (!probeCol) problems.push("No temperature column: name one “probe_c” (readings in °C).");
  if (problems.length) return { rows: [], problems };
  const rows: ReadingInput[] = [];
  parsed.data.forEach((r, i) => {
    const line = i + 2;
    const when = parseLogDateTime(r[readAtCol!] ?? "");
    const probeText = (r[probeCol!] ?? "").trim();
    const probe = Number(probeText);
    const turnedText = (turnedCol ? (r[turnedCol] ?? "") : "").trim().toLowerCase();
    if (!when) problems.push(`Line ${line}: “${r[readAtCol!] ?? ""}” is not a date-time; write 2025-06-01 08:30.`);
    if (probeText === "" || !Number.isFinite(probe)) problems.push(`Line ${line}: the probe reading “${probeText}” is not a number of °C.`);
    else if (probe < -30 || probe > 95) problems.push(`Line ${line}: ${probe} °C is outside what a compost probe reads (−30 to 95 °C).`);
    if (!TURNED_YES.has(turnedText) && !TURNED_NO.has(turnedText)) problems.push(`Line ${line}: “turned” must be yes or no (got “${turnedText}”).`);
    if (when && Number.isFinite(probe)) rows.push({ readAt: when.toISOString(), probeC: probe, turned: TURNED_YES.has(turnedText) });
  });
  if (rows.length === 0 && problems.length === 0) problems.push("The file has a header but no readings.");
  return { rows, problems };
}

