// Results typed in by hand, and corrections of stored results: the same checks as a file, and a
// correction always carries a reason. A correction adds a new measurement that supersedes the
// old one, so the history stays whole.
import { and, eq, sql } from "drizzle-orm";
import { recordAudit } from "../audit";
import { db, schema } from "../db";
import { intakeContext } from "./context";
import { IntakeError } from "./errors";
import { currentMeasurement } from "./events";
import { validateTable, type ColumnMapping, type Review } from "./validate";

export interface EntryRow {
  sampleCode: string;
  /** Cell text by field key, as typed. */
  cells: Record<string, string>;
  /** Required when the sample already has a result of this kind. */
  reason?: string;
}

export type EntryOutcome =
  | { ok: true; entered: number; corrected: number; dataVersion: number }
  | { ok: false; review: Review; reasonErrors: Record<string, string>; message: string };

/**
 * Checks the rows like an uploaded file and, when nothing is wrong (warnings confirmed), writes
 * them in one transaction: new results, or corrections superseding the current result with the
 * reason and before/after values in the audit log.
 */
export async function saveEntries(
  trialId: string,
  programId: string,
  actorId: string,
  kindId: string,
  rows: EntryRow[],
  { confirmWarnings = false }: { confirmWarnings?: boolean } = {},
): Promise<EntryOutcome> {
  if (rows.length === 0) throw new IntakeError("Nothing was entered or changed.");
  return db.transaction(async (tx) => {
    await tx.select({ id: schema.trials.id }).from(schema.trials).where(eq(schema.trials.id, trialId)).for("update");
    const context = await intakeContext(trialId, programId, kindId, tx);
    const codes = rows.map((r) => r.sampleCode.trim().toUpperCase());
    const replacing = new Set(codes.map((c) => context.samples.get(c)?.sampleId).filter((id): id is string => !!id && context.committed.has(id)));
    context.replacing = replacing;
    const fields = context.kind.fields;
    const table = {
      headers: fields.map((f) => f.header),
      rows: rows.map((r) => fields.map((f) => (f.key === "sampleCode" ? r.sampleCode : (r.cells[f.key] ?? "")))),
      rowNumbers: rows.map((_, i) => i + 1),
    };
    const mapping: ColumnMapping = Object.fromEntries(fields.map((f, i) => [f.key, i]));
    const review = validateTable(table, mapping, false, context);
    const reasonErrors: Record<string, string> = {};
    rows.forEach((r, i) => {
      const sampleId = review.rows[i].sampleId;
      if (sampleId && replacing.has(sampleId) && (r.reason ?? "").trim().length < 3) {
        reasonErrors[codes[i]] = "A correction needs a reason (for example “re-weighed crucible 14”).";
      }
    });
    if (review.counts.error > 0 || Object.keys(reasonErrors).length > 0) {
      return { ok: false as const, review, reasonErrors, message: "Nothing was saved: fix the marked rows." };
    }
    if (review.counts.warning > 0 && !confirmWarnings) {
      return { ok: false as const, review, reasonErrors, message: "Some rows have warnings. Check them, tick “I checked the warnings” and save again." };
    }
    let entered = 0;
    let corrected = 0;
    for (const [i, row] of review.rows.entries()) {
      const sampleId = row.sampleId!;
      const previous = context.committed.get(sampleId);
      const [before] = previous
        ? await tx.select().from(schema.measurements).where(and(eq(schema.measurements.id, previous.measurementId), currentMeasurement()))
        : [undefined];
      if (previous && !before) throw new IntakeError(`Sample ${row.sampleCode} was corrected by someone else a moment ago; reload and try again.`, undefined, 409);
      const [inserted] = await tx
        .insert(schema.measurements)
        .values({
          sampleId,
          kind: context.kind.id,
          inputs: row.inputs,
          enteredBy: actorId,
          supersedes: before?.id ?? null,
          // A correction keeps the QC decision's absence explicit: it starts as ok.
          status: "ok",
        })
        .returning({ id: schema.measurements.id });
      const reason = rows[i].reason?.trim() || null;
      await recordAudit(
        {
          programId,
          trialId,
          actorId,
          action: before ? "correct" : "enter",
          entity: "measurement",
          entityId: inserted.id,
          details: { sampleCode: row.sampleCode, kind: context.kind.id, before: before?.inputs ?? null, after: row.inputs, reason, supersedes: before?.id ?? null },
        },
        tx,
      );
      if (before) corrected++;
      else entered++;
    }
    const [{ dataVersion }] = await tx
      .update(schema.trials)
      .set({ dataVersion: sql`${schema.trials.dataVersion} + 1`, updatedAt: new Date() })
      .where(eq(schema.trials.id, trialId))
      .returning({ dataVersion: schema.trials.dataVersion });
    return { ok: true as const, entered, corrected, dataVersion };
  });
}

/** Every measurement a sample ever had (corrections included), newest first, with who and where from. */
export async function sampleHistory(trialId: string, code: string) {
  const [sample] = await db
    .select({ id: schema.samples.id, eventId: schema.samples.eventId })
    .from(schema.samples)
    .where(and(eq(schema.samples.trialId, trialId), eq(schema.samples.code, code.trim().toUpperCase())));
  if (!sample) return null;
  const history = await db
    .select({
      id: schema.measurements.id,
      kind: schema.measurements.kind,
      inputs: schema.measurements.inputs,
      status: schema.measurements.status,
      statusReason: schema.measurements.statusReason,
      supersedes: schema.measurements.supersedes,
      createdAt: schema.measurements.createdAt,
      sourceRow: schema.measurements.sourceRow,
      enteredBy: schema.users.name,
      uploadId: schema.uploads.id,
      filename: schema.uploads.filename,
    })
    .from(schema.measurements)
    .innerJoin(schema.users, eq(schema.users.id, schema.measurements.enteredBy))
    .leftJoin(schema.uploads, eq(schema.uploads.id, schema.measurements.uploadId))
    .where(eq(schema.measurements.sampleId, sample.id))
    .orderBy(sql`${schema.measurements.createdAt} desc`);
  const replaced = new Set(history.map((h) => h.supersedes).filter(Boolean));
  return { sampleId: sample.id, eventId: sample.eventId, history: history.map((h) => ({ ...h, current: !replaced.has(h.id) })) };
}

/** Current inputs of one kind for every sample of an event, by sample code: what the entry grid starts from. */
export async function currentInputsOfEvent(eventId: string, kind: string) {
  const rows = await db
    .select({ code: schema.samples.code, inputs: schema.measurements.inputs, status: schema.measurements.status })
    .from(schema.measurements)
    .innerJoin(schema.samples, eq(schema.samples.id, schema.measurements.sampleId))
    .where(and(eq(schema.samples.eventId, eventId), eq(schema.measurements.kind, kind), currentMeasurement()));
  return new Map(rows.map((r) => [r.code, r]));
}
