// Turning an uploaded file's bytes into a table of text cells: UTF-8 with or without a byte-order
// mark, comma, semicolon or tab delimited, parsed by papaparse. Pure: no database.
import Papa from "papaparse";

/** The largest file lab intake accepts: 20 MB (issue 4). */
export const MAX_UPLOAD_BYTES = 20 * 1024 * 1024;

export type Delimiter = "," | ";" | "\t";
export const DELIMITER_LABELS: Record<Delimiter, string> = { ",": "comma", ";": "semicolon", "\t": "tab" };

export interface ParseOptions {
  /** Undefined: let papaparse guess among comma, semicolon and tab. */
  delimiter?: Delimiter;
  /** Numbers are written with a decimal comma (12,5). */
  decimalComma: boolean;
}

export interface ParsedTable {
  headers: string[];
  /** Data rows, cells as text; `rowNumbers[i]` is the spreadsheet row of `rows[i]` (header = row 1). */
  rows: string[][];
  rowNumbers: number[];
  delimiter: Delimiter;
  hadBom: boolean;
}

/** A problem with the whole file: nothing in it can be read as rows. */
export class FileProblem extends Error {
  constructor(message: string) {
    super(message);
    this.name = "FileProblem";
  }
}

const BOM = [0xef, 0xbb, 0xbf];

/** UTF-8 text of the file, without a byte-order mark; refuses binary content and other encodings. */
export function decodeUtf8(bytes: Uint8Array): { text: string; hadBom: boolean } {
  if (bytes.length === 0) throw new FileProblem("The file is empty. Export the results again and choose the saved CSV file.");
  if (bytes.length > MAX_UPLOAD_BYTES) throw new FileProblem(tooLargeMessage(bytes.length));
  const hadBom = BOM.every((b, i) => bytes[i] === b);
  const body = hadBom ? bytes.subarray(3) : bytes;
  const sniff = body.subarray(0, 8192);
  if (sniff.includes(0) || (sniff[0] === 0x50 && sniff[1] === 0x4b)) {
    throw new FileProblem(
      "This looks like a spreadsheet or other binary file, not CSV text. In your spreadsheet use “Save as” → “CSV UTF-8”, then upload that file.",
    );
  }
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(body);
  } catch {
    throw new FileProblem(
      "The file is not UTF-8 text (perhaps saved in an older Windows or Mac encoding). Save it again as “CSV UTF-8” and upload that.",
    );
  }
  return { text, hadBom };
}

export function tooLargeMessage(bytes: number): string {
  const mb = (bytes / 1024 / 1024).toFixed(1);
  return `The file is ${mb} MB; lab intake takes files up to 20 MB. Split it into several files (for example one per sampling event) and upload each.`;
}

/**
 * Reads the text into rows with papaparse. Blank lines are skipped; quoted cells may hold the
 * delimiter and newlines. Throws FileProblem when there is no header, no data row, or the columns
 * cannot be told apart.
 */
export function parseCsvText(text: string, options: ParseOptions, hadBom = false): ParsedTable {
  const guesses: Delimiter[] = options.decimalComma ? [";", "\t"] : [",", ";", "\t"];
  const result = Papa.parse<string[]>(text, {
    header: false,
    skipEmptyLines: "greedy",
    delimiter: options.delimiter ?? "",
    delimitersToGuess: guesses,
  });
  const all = result.data;
  const quoteError = result.errors.find((e) => e.type === "Quotes");
  if (quoteError) {
    throw new FileProblem(
      `A quoted cell is never closed (near row ${(quoteError.row ?? 0) + 2}). Check for a stray " in that row, or save the file again from the spreadsheet.`,
    );
  }
  if (all.length === 0 || all[0].every((c) => c.trim() === "")) {
    throw new FileProblem("The file has no header row. Start from Tilthmark's template so the columns are named.");
  }
  const delimiter = (result.meta.delimiter || ",") as Delimiter;
  const headers = all[0].map((h) => h.trim());
  if (headers.length === 1) {
    const other = ([",", ";", "\t"] as Delimiter[]).find((d) => d !== delimiter && headers[0].includes(d));
    throw new FileProblem(
      other
        ? `The header row reads as one column: the file seems to use ${DELIMITER_LABELS[other]}s between columns. Choose “${DELIMITER_LABELS[other]}” under “Columns separated by” and upload again.`
        : "The header row has only one column. Lab results need a sample-code column and at least one value column; start from Tilthmark's template.",
    );
  }
  if (all.length === 1) {
    throw new FileProblem("The file has a header row but no data rows. Fill in one row per sample and upload again.");
  }
  // Spreadsheet row numbers: papaparse's rows are records, so a quoted newline does not shift them.
  const rows = all.slice(1);
  const rowNumbers = rows.map((_, i) => i + 2);
  return { headers, rows, rowNumbers, delimiter, hadBom };
}

/** Bytes to table in one step. */
export function parseCsvBytes(bytes: Uint8Array, options: ParseOptions): ParsedTable {
  const { text, hadBom } = decodeUtf8(bytes);
  return parseCsvText(text, options, hadBom);
}

const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const COMMA_NUMBER = /^[+-]?(\d+,?\d*|,\d+)([eE][+-]?\d+)?$/;

export type NumberCell = { ok: true; value: number | null } | { ok: false; reason: "not-a-number" | "decimal-comma" };

/**
 * A cell as a number: blank → null; "12.5" always; "12,5" only when the file declares a decimal
 * comma (otherwise it is refused with a hint). Thousands separators are refused.
 */
export function readNumber(cell: string | undefined, decimalComma: boolean): NumberCell {
  const text = (cell ?? "").trim();
  if (text === "") return { ok: true, value: null };
  if (decimalComma && COMMA_NUMBER.test(text)) return { ok: true, value: Number(text.replace(",", ".")) };
  if (PLAIN_NUMBER.test(text) && !(decimalComma && text.includes("."))) return { ok: true, value: Number(text) };
  if (!decimalComma && COMMA_NUMBER.test(text)) return { ok: false, reason: "decimal-comma" };
  return { ok: false, reason: "not-a-number" };
}
