// CSV exports. Numbers stay numbers; a text cell that a spreadsheet would read as a formula gets a
// leading apostrophe (DESIGN.md "Architecture": formula-injection guard). Every export uses this.

export type CsvCell = string | number | boolean | null | undefined;

const FORMULA_START = /^[=+\-@\t\r]/;
const NUMERIC_TEXT = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** One cell as CSV text: numbers as written, dangerous text defused with ', quoted when needed. */
export function csvCell(value: CsvCell): string {
  if (value === null || value === undefined) return "";
  if (typeof value === "number") return Number.isFinite(value) ? String(value) : "";
  if (typeof value === "boolean") return value ? "yes" : "no";
  let text = value;
  if (FORMULA_START.test(text) && !NUMERIC_TEXT.test(text.trim())) text = `'${text}`;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** Rows to CSV text with CRLF line ends (RFC 4180). */
export function toCsv(rows: readonly (readonly CsvCell[])[]): string {
  return rows.map((row) => row.map(csvCell).join(",")).join("\r\n") + "\r\n";
}

/** A CSV download. The byte-order mark lets spreadsheet programs read °, ² and × as UTF-8. */
export function csvResponse(filename: string, rows: readonly (readonly CsvCell[])[]): Response {
  return new Response(`\uFEFF${toCsv(rows)}`, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="${filename.replace(/[^A-Za-z0-9._-]+/g, "-")}"`,
      "Cache-Control": "private, no-store",
    },
  });
}

/** Rounds for export without turning the number into text. */
export function rounded(value: number | null | undefined, digits: number): number | null {
  if (value === null || value === undefined || !Number.isFinite(value)) return null;
  const f = 10 ** digits;
  return Math.round(value * f) / f;
}
