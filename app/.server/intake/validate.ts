// Row-by-row checking of lab results before anything is stored: every row gets a status (ok,
// warning, error) and, for each problem, the column and a sentence saying how to fix it.
// Pure: the database facts it needs arrive in an IntakeContext.
import { z } from "zod";
import { depthIncrementProblems, type DepthIncrement } from "../../../analysis/soil";
import { deriveBd, deriveCustom, deriveLoi, type CarbonMethod, type Derivation, type Inputs } from "./compute";
import type { CustomVariableDef, FieldDef, KindDef } from "./kinds";
import { outlierScores, type OutlierPoint } from "./outliers";
import { readNumber } from "./parse";

export interface SampleInfo {
  sampleId: string;
  code: string;
  eventId: string;
  /** How people name the event: "2026 fall (E3)". */
  eventLabel: string;
  plotNumber: number;
  block: string;
  treatment: string;
  topCm: number;
  bottomCm: number;
}

export interface CommittedValue {
  measurementId: string;
  /** The number the outlier check uses (LOI %, BD g/cm³ or the custom value); null when it could not be derived. */
  value: number | null;
  source: string;
}

export interface IntakeContext {
  kind: KindDef;
  /** Present for a custom variable. */
  custom?: CustomVariableDef;
  method: CarbonMethod;
  /** Samples of the trial by code (upper case). */
  samples: Map<string, SampleInfo>;
  /** Depth increments of every sampling event. */
  eventDepths: Map<string, DepthIncrement[]>;
  /** Current committed measurements of this kind, by sample id. */
  committed: Map<string, CommittedValue>;
  /** Samples whose committed value this input replaces (corrections): not duplicates, not in the outlier baseline. */
  replacing?: Set<string>;
}

export type RowStatus = "ok" | "warning" | "error";

export interface RowMessage {
  severity: "error" | "warning";
  /** The column as the file names it, or null for a problem of the whole row. */
  column: string | null;
  message: string;
}

export interface ReviewRow {
  index: number;
  rowNumber: number;
  sampleCode: string;
  sampleId: string | null;
  eventId: string | null;
  plotNumber: number | null;
  depth: string | null;
  inputs: Inputs;
  derived: Record<string, number | null>;
  status: RowStatus;
  messages: RowMessage[];
}

export interface ReviewCounts {
  ok: number;
  warning: number;
  error: number;
}

export interface Review {
  rows: ReviewRow[];
  counts: ReviewCounts;
}

export interface IntakeTable {
  headers: string[];
  rows: string[][];
  rowNumbers: number[];
}

/** Field key → index of the file column that holds it. */
export type ColumnMapping = Record<string, number>;

/** Required fields with no column; BD also needs a volume or both ring dimensions. */
export function missingFields(kind: KindDef, mapping: ColumnMapping): FieldDef[] {
  const missing = kind.fields.filter((f) => f.required && mapping[f.key] === undefined);
  if (kind.id === "bd") {
    const hasVolume = mapping.volumeCm3 !== undefined;
    const hasRing = mapping.diameterCm !== undefined && mapping.heightCm !== undefined;
    if (!hasVolume && !hasRing) {
      missing.push(...kind.fields.filter((f) => ["diameterCm", "heightCm", "volumeCm3"].includes(f.key) && mapping[f.key] === undefined));
    }
  }
  return missing;
}

const quote = (text: string) => `“${text.length > 40 ? `${text.slice(0, 40)}…` : text}”`;

function numberCell(field: FieldDef, decimalComma: boolean) {
  return z
    .string()
    .optional()
    .transform((cell, ctx): number | null => {
      const read = readNumber(cell, decimalComma);
      if (!read.ok) {
        ctx.addIssue({
          code: "custom",
          message:
            read.reason === "decimal-comma"
              ? `${quote(cell ?? "")} uses a decimal comma. Tick “Numbers use a decimal comma” when uploading, or write it as ${(cell ?? "").replace(",", ".")}.`
              : `${quote(cell ?? "")} is not a number. Enter ${field.label.toLowerCase()} as a number${field.example ? `, for example ${decimalComma ? field.example.replace(".", ",") : field.example}` : ""}.`,
        });
        return z.NEVER;
      }
      if (read.value === null && field.required) {
        ctx.addIssue({ code: "custom", message: `${field.label} is blank. Fill it in${field.example ? ` (for example ${field.example})` : ""}.` });
        return z.NEVER;
      }
      if (read.value !== null && field.nonNegative && read.value < 0) {
        ctx.addIssue({ code: "custom", message: `${field.label} is negative (${read.value}); it cannot be. Check the sign and the weighing.` });
        return z.NEVER;
      }
      return read.value;
    });
}

const rowSchemas = new Map<string, z.ZodType<Inputs>>();

/** The zod schema that turns one row's cells (by field key) into typed inputs, cached per kind and decimal mark. */
export function rowSchema(kind: KindDef, decimalComma: boolean): z.ZodType<Inputs> {
  const cacheKey = `${kind.id}|${kind.fields.map((f) => f.header).join(",")}|${decimalComma}`;
  let schema = rowSchemas.get(cacheKey);
  if (!schema) {
    const shape: Record<string, z.ZodType> = {};
    for (const field of kind.fields) {
      if (field.type === "number") shape[field.key] = numberCell(field, decimalComma);
      else if (field.type === "code") {
        shape[field.key] = z
          .string({ error: "The sample code is blank. Copy it from the bag label or the sample sheet." })
          .trim()
          .min(1, "The sample code is blank. Copy it from the bag label or the sample sheet.")
          .max(64, "The sample code is longer than any code Tilthmark prints; check the cell.")
          .transform((s) => s.toUpperCase());
      } else {
        shape[field.key] = z
          .string()
          .optional()
          .transform((s) => (s ?? "").trim())
          .pipe(z.string().max(2000, `${field.label} is longer than 2000 characters; shorten it.`))
          .transform((s) => (s === "" ? null : s));
      }
    }
    schema = z.object(shape) as unknown as z.ZodType<Inputs>;
    rowSchemas.set(cacheKey, schema);
  }
  return schema;
}

function derive(context: IntakeContext, inputs: Inputs): Derivation<Record<string, number | null>> {
  if (context.kind.id === "loi") return deriveLoi(inputs, context.method) as Derivation<Record<string, number | null>>;
  if (context.kind.id === "bd") return deriveBd(inputs) as unknown as Derivation<Record<string, number | null>>;
  const custom = context.custom!;
  return deriveCustom(inputs, { ...custom, label: custom.label });
}

const depthLabel = (d: { topCm: number; bottomCm: number }) => `${d.topCm}–${d.bottomCm} cm`;

/**
 * Checks every row of a table against the trial: cell types (zod), sample codes, duplicates,
 * results already committed, the soil formulas' own refusals (ash heavier than dry soil …),
 * plausibility flags, depth gaps per plot and event, and outliers per event and depth.
 */
export function validateTable(table: IntakeTable, mapping: ColumnMapping, decimalComma: boolean, context: IntakeContext): Review {
  const { kind } = context;
  const schema = rowSchema(kind, decimalComma);
  const columnOf = (fieldKey: string | undefined): string | null => {
    if (!fieldKey) return null;
    const index = mapping[fieldKey];
    if (index !== undefined) return table.headers[index];
    return kind.fields.find((f) => f.key === fieldKey)?.header ?? null;
  };
  const mappedIndexes = new Set(Object.values(mapping));

  const rows: ReviewRow[] = table.rows.map((cells, index) => {
    const messages: RowMessage[] = [];
    const record: Record<string, string | undefined> = {};
    for (const field of kind.fields) {
      const i = mapping[field.key];
      record[field.key] = i === undefined ? undefined : cells[i];
    }
    const extra = cells.slice(table.headers.length).filter((c) => c.trim() !== "");
    if (extra.length > 0) {
      messages.push({
        severity: "error",
        column: null,
        message: `This row has ${cells.length} cells but the header has ${table.headers.length}: a cell holds an unquoted delimiter or the row is shifted. Fix the row so each value sits under its heading.`,
      });
    }
    const parsed = schema.safeParse(record);
    let inputs: Inputs = {};
    if (parsed.success) inputs = parsed.data;
    else {
      for (const issue of parsed.error.issues) messages.push({ severity: "error", column: columnOf(String(issue.path[0])), message: issue.message });
      // Keep what could be read, so the review shows the row as the lab wrote it.
      for (const field of kind.fields) inputs[field.key] = record[field.key]?.trim() || null;
    }
    const code = String(parsed.success ? inputs.sampleCode : (record.sampleCode ?? "")).trim().toUpperCase();
    const sample = code ? context.samples.get(code) : undefined;
    if (code && !sample) {
      messages.push({
        severity: "error",
        column: columnOf("sampleCode"),
        message: `Sample code ${quote(code)} is not on any sample sheet of this trial. Check it against the bag label (codes look like E1-101-0-10).`,
      });
    }
    let derived: Record<string, number | null> = {};
    if (parsed.success) {
      const result = derive(context, inputs);
      if (result.ok) {
        derived = result.values;
        for (const flag of result.flags) {
          if (flag.status !== "ok") messages.push({ severity: flag.status, column: null, message: flag.message });
        }
      } else {
        messages.push({ severity: "error", column: columnOf(result.error.field), message: result.error.message });
      }
    }
    for (const [key, value] of Object.entries(inputs)) {
      const field = kind.fields.find((f) => f.key === key);
      if (field?.type === "text" && typeof value === "string" && /^[=+\-@]/.test(value) && mappedIndexes.has(mapping[key])) {
        messages.push({
          severity: "warning",
          column: columnOf(key),
          message: `${field.label} starts with ${quote(value.slice(0, 1))}; Tilthmark keeps it as plain text and never runs it as a spreadsheet formula.`,
        });
      }
    }
    return {
      index,
      rowNumber: table.rowNumbers[index],
      sampleCode: code,
      sampleId: sample?.sampleId ?? null,
      eventId: sample?.eventId ?? null,
      plotNumber: sample?.plotNumber ?? null,
      depth: sample ? depthLabel(sample) : null,
      inputs,
      derived,
      status: "ok",
      messages,
    };
  });

  const sampleOf = (row: ReviewRow) => (row.sampleId ? context.samples.get(row.sampleCode)! : undefined);

  // Duplicates within the file, and results this trial already holds.
  const bySample = new Map<string, ReviewRow[]>();
  const push = <K, V>(map: Map<K, V[]>, key: K, value: V) => {
    const list = map.get(key);
    if (list) list.push(value);
    else map.set(key, [value]);
  };
  for (const row of rows) if (row.sampleId) push(bySample, row.sampleId, row);
  for (const group of bySample.values()) {
    if (group.length > 1) {
      for (const row of group) {
        const others = group.filter((r) => r !== row).map((r) => r.rowNumber);
        row.messages.push({
          severity: "error",
          column: columnOf("sampleCode"),
          message: `Sample ${row.sampleCode} also appears on row ${others.join(", ")}. Keep one row per sample (the accepted replicate or the lab's mean).`,
        });
      }
    }
    const existing = context.committed.get(group[0].sampleId!);
    if (existing && !context.replacing?.has(group[0].sampleId!)) {
      for (const row of group) {
        row.messages.push({
          severity: "error",
          column: columnOf("sampleCode"),
          message: `Sample ${row.sampleCode} already has a ${kind.label} result (from ${existing.source}). To change it, open the sample under Data and correct it with a reason; otherwise remove this row.`,
        });
      }
    }
  }

  // Depth gaps: per plot and event, the increments with results must run from the surface without a gap.
  const byCore = new Map<string, ReviewRow[]>();
  for (const row of rows) {
    const sample = sampleOf(row);
    if (sample) push(byCore, `${sample.eventId}|${sample.plotNumber}`, row);
  }
  const committedByCore = new Map<string, DepthIncrement[]>();
  for (const sample of context.samples.values()) {
    if (context.committed.has(sample.sampleId)) {
      push(committedByCore, `${sample.eventId}|${sample.plotNumber}`, sample as DepthIncrement);
    }
  }
  for (const [core, coreRows] of byCore) {
    const present = new Map<string, DepthIncrement>();
    for (const d of committedByCore.get(core) ?? []) present.set(depthLabel(d), d);
    for (const row of coreRows) {
      const s = sampleOf(row)!;
      present.set(depthLabel(s), s);
    }
    const problems = depthIncrementProblems([...present.values()]);
    if (problems.length > 0) {
      const first = sampleOf(coreRows[0])!;
      for (const row of coreRows) {
        row.messages.push({
          severity: "error",
          column: columnOf("sampleCode"),
          message: `Plot ${first.plotNumber} in ${first.eventLabel}: ${problems.join(" ")} Add the missing increment's row, or leave this plot's rows out until it is measured.`,
        });
      }
    }
  }

  // Outliers per event and depth, against what is committed plus this file.
  const variable = kind.outlierVariable;
  const groups = new Map<string, OutlierPoint[]>();
  const add = (sample: SampleInfo, key: string, value: number) => {
    push(groups, `${sample.eventId}|${depthLabel(sample)}`, { key, block: sample.block, treatment: sample.treatment, value });
  };
  const incoming = new Set(rows.filter((r) => r.sampleId).map((r) => r.sampleId!));
  for (const sample of context.samples.values()) {
    const existing = context.committed.get(sample.sampleId);
    if (existing?.value != null && !incoming.has(sample.sampleId) && !context.replacing?.has(sample.sampleId)) {
      add(sample, `c:${sample.sampleId}`, existing.value);
    }
  }
  for (const row of rows) {
    const value = row.derived[variable];
    const sample = sampleOf(row);
    if (sample && typeof value === "number" && !row.messages.some((m) => m.severity === "error")) add(sample, `r:${row.index}`, value);
  }
  for (const [group, points] of groups) {
    const scores = outlierScores(points);
    const depth = group.split("|")[1];
    for (const [key, score] of scores) {
      if (!score.flagged || !key.startsWith("r:")) continue;
      const row = rows[Number(key.slice(2))];
      const sample = sampleOf(row)!;
      const shown = (row.derived[variable] as number).toFixed(2);
      row.messages.push({
        severity: "warning",
        column: null,
        message:
          score.method === "studentized"
            ? `${shown} is far from what its treatment and block lead one to expect in ${sample.eventLabel}, ${depth} (studentized residual ${score.score.toFixed(1)}, beyond ±3). Check the weighings and the sample code; confirm it if it is right.`
            : `${shown} stands out from the other ${sample.treatment} plots in ${sample.eventLabel}, ${depth} (robust z ${score.score.toFixed(1)}, beyond ±3.5). Check the weighings and the sample code; confirm it if it is right.`,
      });
    }
  }

  const counts: ReviewCounts = { ok: 0, warning: 0, error: 0 };
  for (const row of rows) {
    row.status = row.messages.some((m) => m.severity === "error") ? "error" : row.messages.length > 0 ? "warning" : "ok";
    counts[row.status]++;
  }
  return { rows, counts };
}
