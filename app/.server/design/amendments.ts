// Amendments, their batches with lab analyses, and composting temperature logs.
import { and, asc, eq, inArray } from "drizzle-orm";
import { z } from "zod";
import { checkPathogenReduction, cnRatio, type PathogenReductionCheck } from "../../../analysis/amendments";
import { recordAudit } from "../audit";
import { db, schema } from "../db";
import { DesignError } from "./errors";
import type { ReadingInput } from "./temperature-log";
import { materialField, optionalNumber, optionalText, requiredText } from "./inputs";

export const AmendmentInput = z.object({
  name: requiredText("a name", 120),
  material: materialField,
  source: optionalText(300),
  description: optionalText(4000),
});
export type AmendmentInput = z.output<typeof AmendmentInput>;

export const COMPOSTING_METHODS = ["turned_windrow", "static_pile", "in_vessel"] as const;

export const BatchInput = z.object({
  label: requiredText("a batch label", 80),
  receivedOn: z
    .string()
    .optional()
    .transform((v) => (v ? v : null))
    .pipe(z.iso.date("Enter the date as YYYY-MM-DD.").nullable()),
  moistureWetBasisPct: optionalNumber("Moisture", { min: 0, max: 99.9, unit: "%" }),
  totalCarbonDryPct: optionalNumber("Total C", { min: 0, max: 100, unit: "%" }),
  totalNitrogenDryPct: optionalNumber("Total N", { min: 0, max: 100, unit: "%" }),
  ph: optionalNumber("pH", { min: 0, max: 14 }),
  ecDsPerM: optionalNumber("EC", { min: 0, max: 200, unit: "dS/m" }),
  compostingMethod: z
    .string()
    .optional()
    .transform((v) => (v ? v : null))
    .pipe(z.enum(COMPOSTING_METHODS, { error: "Choose one of the listed methods." }).nullable()),
  notes: optionalText(4000),
});
export type BatchInput = z.output<typeof BatchInput>;

const isUuid = (id: string) => /^[0-9a-f-]{36}$/i.test(id);

export async function listAmendments(programId: string) {
  const amendments = await db
    .select()
    .from(schema.amendments)
    .where(eq(schema.amendments.programId, programId))
    .orderBy(asc(schema.amendments.name));
  const batches = amendments.length
    ? await db
        .select()
        .from(schema.amendmentBatches)
        .where(inArray(schema.amendmentBatches.amendmentId, amendments.map((a) => a.id)))
        .orderBy(asc(schema.amendmentBatches.label))
    : [];
  return amendments.map((a) => ({ ...a, batches: batches.filter((b) => b.amendmentId === a.id).map(withCn) }));
}

/** C:N derived from the stored dry-basis C and N (never typed in). */
export function withCn<B extends { totalCarbonDryPct: number | null; totalNitrogenDryPct: number | null }>(batch: B) {
  const cn =
    batch.totalCarbonDryPct !== null && batch.totalNitrogenDryPct !== null && batch.totalNitrogenDryPct > 0
      ? cnRatio(batch.totalCarbonDryPct, batch.totalNitrogenDryPct)
      : null;
  return { ...batch, cnRatio: cn };
}

export async function getAmendment(programId: string, amendmentId: string) {
  if (!isUuid(amendmentId)) return null;
  const [a] = await db
    .select()
    .from(schema.amendments)
    .where(and(eq(schema.amendments.id, amendmentId), eq(schema.amendments.programId, programId)));
  if (!a) return null;
  const batches = await db
    .select()
    .from(schema.amendmentBatches)
    .where(eq(schema.amendmentBatches.amendmentId, a.id))
    .orderBy(asc(schema.amendmentBatches.label));
  return { ...a, batches: batches.map(withCn) };
}

export async function createAmendment(actorId: string, programId: string, input: AmendmentInput) {
  return db.transaction(async (tx) => {
    const [clash] = await tx
      .select({ id: schema.amendments.id })
      .from(schema.amendments)
      .where(and(eq(schema.amendments.programId, programId), eq(schema.amendments.name, input.name)));
    if (clash) throw new DesignError(`This program already has an amendment called “${input.name}”.`, "name");
    const [row] = await tx.insert(schema.amendments).values({ programId, ...input }).returning();
    await recordAudit({ programId, actorId, action: "create", entity: "amendment", entityId: row.id, details: { ...input } }, tx);
    return row;
  });
}

/** Renames or re-describes an amendment; the audit log keeps each changed field's old and new value. */
export async function updateAmendment(actorId: string, programId: string, amendmentId: string, input: AmendmentInput) {
  return db.transaction(async (tx) => {
    const [before] = await tx
      .select()
      .from(schema.amendments)
      .where(and(eq(schema.amendments.id, amendmentId), eq(schema.amendments.programId, programId)));
    if (!before) throw new DesignError("No such amendment in this program.");
    const [clash] = await tx
      .select({ id: schema.amendments.id })
      .from(schema.amendments)
      .where(and(eq(schema.amendments.programId, programId), eq(schema.amendments.name, input.name)));
    if (clash && clash.id !== amendmentId) throw new DesignError(`This program already has an amendment called “${input.name}”.`, "name");
    await tx.update(schema.amendments).set(input).where(eq(schema.amendments.id, amendmentId));
    const changed = (Object.keys(input) as (keyof AmendmentInput)[]).filter((k) => input[k] !== before[k]);
    await recordAudit(
      { programId, actorId, action: "update", entity: "amendment", entityId: amendmentId, details: Object.fromEntries(changed.map((k) => [k, { from: before[k], to: input[k] }])) },
      tx,
    );
  });
}

/**
 * Removes an amendment recorded by mistake. One with batches stays: batches carry lab analyses
 * and may be named in trials' applications, and the record of what went on the plots must last.
 */
export async function deleteAmendment(actorId: string, programId: string, amendmentId: string) {
  return db.transaction(async (tx) => {
    const [amendment] = await tx
      .select()
      .from(schema.amendments)
      .where(and(eq(schema.amendments.id, amendmentId), eq(schema.amendments.programId, programId)))
      .for("update");
    if (!amendment) throw new DesignError("No such amendment in this program.");
    const batches = await tx.select({ id: schema.amendmentBatches.id }).from(schema.amendmentBatches).where(eq(schema.amendmentBatches.amendmentId, amendmentId));
    if (batches.length > 0) {
      throw new DesignError(
        `“${amendment.name}” has ${batches.length} batch${batches.length === 1 ? "" : "es"} on record, so it stays: batches carry lab analyses and trials name them. Rename it instead if the name is wrong.`,
      );
    }
    await tx.delete(schema.amendments).where(eq(schema.amendments.id, amendmentId));
    await recordAudit({ programId, actorId, action: "delete", entity: "amendment", entityId: amendmentId, details: { name: amendment.name, material: amendment.material } }, tx);
  });
}

export async function createBatch(actorId: string, programId: string, amendmentId: string, input: BatchInput) {
  return db.transaction(async (tx) => {
    const [clash] = await tx
      .select({ id: schema.amendmentBatches.id })
      .from(schema.amendmentBatches)
      .where(and(eq(schema.amendmentBatches.amendmentId, amendmentId), eq(schema.amendmentBatches.label, input.label)));
    if (clash) throw new DesignError(`This amendment already has a batch labelled “${input.label}”.`, "label");
    const [row] = await tx.insert(schema.amendmentBatches).values({ amendmentId, ...input }).returning();
    await recordAudit({ programId, actorId, action: "create", entity: "amendment_batch", entityId: row.id, details: { ...input } }, tx);
    return row;
  });
}

export async function getBatch(programId: string, amendmentId: string, batchId: string) {
  if (!isUuid(batchId) || !isUuid(amendmentId)) return null;
  const [row] = await db
    .select({ batch: schema.amendmentBatches, amendment: schema.amendments })
    .from(schema.amendmentBatches)
    .innerJoin(schema.amendments, eq(schema.amendments.id, schema.amendmentBatches.amendmentId))
    .where(
      and(eq(schema.amendmentBatches.id, batchId), eq(schema.amendments.id, amendmentId), eq(schema.amendments.programId, programId)),
    );
  if (!row) return null;
  const readings = await db
    .select()
    .from(schema.batchTemperatureReadings)
    .where(eq(schema.batchTemperatureReadings.batchId, batchId))
    .orderBy(asc(schema.batchTemperatureReadings.readAt));
  return { amendment: row.amendment, batch: withCn(row.batch), readings };
}

export async function updateBatch(actorId: string, programId: string, batchId: string, input: BatchInput) {
  return db.transaction(async (tx) => {
    const [before] = await tx.select().from(schema.amendmentBatches).where(eq(schema.amendmentBatches.id, batchId));
    if (!before) throw new DesignError("No such batch.");
    const [clash] = await tx
      .select({ id: schema.amendmentBatches.id })
      .from(schema.amendmentBatches)
      .where(and(eq(schema.amendmentBatches.amendmentId, before.amendmentId), eq(schema.amendmentBatches.label, input.label)));
    if (clash && clash.id !== batchId) throw new DesignError(`This amendment already has a batch labelled “${input.label}”.`, "label");
    await tx.update(schema.amendmentBatches).set(input).where(eq(schema.amendmentBatches.id, batchId));
    const changed = (Object.keys(input) as (keyof BatchInput)[]).filter((k) => input[k] !== before[k]);
    await recordAudit(
      {
        programId,
        actorId,
        action: "update",
        entity: "amendment_batch",
        entityId: batchId,
        details: Object.fromEntries(changed.map((k) => [k, { from: before[k], to: input[k] }])),
      },
      tx,
    );
  });
}

// ----- temperature logs -----

export async function addReadings(actorId: string, programId: string, batchId: string, rows: ReadingInput[], source: string) {
  if (rows.length === 0) throw new DesignError("There are no readings to add.");
  return db.transaction(async (tx) => {
    await tx.insert(schema.batchTemperatureReadings).values(rows.map((r) => ({ batchId, readAt: new Date(r.readAt), probeC: r.probeC, turned: r.turned })));
    await recordAudit(
      { programId, actorId, action: "add", entity: "temperature_reading", entityId: batchId, details: { count: rows.length, source } },
      tx,
    );
  });
}

export async function deleteReading(actorId: string, programId: string, batchId: string, readingId: string) {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .delete(schema.batchTemperatureReadings)
      .where(and(eq(schema.batchTemperatureReadings.id, readingId), eq(schema.batchTemperatureReadings.batchId, batchId)))
      .returning();
    if (!row) throw new DesignError("That reading is not in this batch's log.");
    await recordAudit(
      { programId, actorId, action: "delete", entity: "temperature_reading", entityId: readingId, details: { readAt: row.readAt.toISOString(), probeC: row.probeC, turned: row.turned } },
      tx,
    );
  });
}

/** The pathogen-reduction check for a batch's log, or null when there is no log or no method. */
export function batchPathogenCheck(
  method: (typeof COMPOSTING_METHODS)[number] | null,
  readings: readonly { readAt: Date; probeC: number; turned: boolean }[],
): PathogenReductionCheck | null {
  if (!method || readings.length === 0) return null;
  return checkPathogenReduction(
    readings.map((r) => ({ takenAt: r.readAt.toISOString().slice(0, 16), temperatureC: r.probeC, turned: r.turned })),
    method,
  );
}

/** Every batch of the program with its dry-basis C and N, for the blend calculator and application forms. */
export async function listProgramBatches(programId: string) {
  const rows = await db
    .select({
      id: schema.amendmentBatches.id,
      label: schema.amendmentBatches.label,
      amendment: schema.amendments.name,
      material: schema.amendments.material,
      moistureWetBasisPct: schema.amendmentBatches.moistureWetBasisPct,
      totalCarbonDryPct: schema.amendmentBatches.totalCarbonDryPct,
      totalNitrogenDryPct: schema.amendmentBatches.totalNitrogenDryPct,
    })
    .from(schema.amendmentBatches)
    .innerJoin(schema.amendments, eq(schema.amendments.id, schema.amendmentBatches.amendmentId))
    .where(eq(schema.amendments.programId, programId))
    .orderBy(asc(schema.amendments.name), asc(schema.amendmentBatches.label));
  return rows.map(withCn);
}
