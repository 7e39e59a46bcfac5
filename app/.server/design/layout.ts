// Randomizing, storing and locking a trial's layout; the plot map's data.
import { asc, count, eq } from "drizzle-orm";
import { assertSeed, drawSeed, type FieldArrangement, type FieldLayout } from "../../../analysis/design";
import type { PlotMapData } from "~/design/plot-map";
import { recordAudit } from "../audit";
import { db, schema } from "../db";
import { DesignError } from "./errors";
import { drawLayout, fieldCell } from "./draw";
import { assertDraft, clearLayout, getTrialForUpdate } from "./trials";

/**
 * Largest seed Tilthmark stores: trial.randomization_seed is a PostgreSQL integer, so seeds are kept
 * to 0 … 2³¹ − 1 (the layout library accepts any unsigned 32-bit seed; this is a subset of it).
 */
export const STORED_SEED_MAX = 2_147_483_647;

export type RandomizeInput = {
  blockCount: number;
  arrangement: FieldArrangement;
  blockOrientation: "rows" | "columns";
  /** null: draw a fresh seed. */
  seed: number | null;
};

/** Draws a new layout (stored seed) and replaces the draft's plots, in one transaction. */
export async function randomize(actorId: string, trialId: string, input: RandomizeInput) {
  // A fresh 32-bit seed, halved into the stored range.
  const seed = input.seed ?? drawSeed() >>> 1;
  assertSeed(seed);
  if (seed > STORED_SEED_MAX) throw new DesignError(`The seed must be at most ${STORED_SEED_MAX}.`, "seed");
  return db.transaction(async (tx) => {
    const trial = await getTrialForUpdate(tx, trialId);
    assertDraft(trial);
    if (!trial.plotLengthM || !trial.plotWidthM) throw new DesignError("Enter the plot size on Setup first: the plot map is drawn to scale.");
    const treatments = await tx
      .select()
      .from(schema.treatments)
      .where(eq(schema.treatments.trialId, trialId))
      .orderBy(asc(schema.treatments.position), asc(schema.treatments.code));
    const factors = await tx.select().from(schema.trialFactors).where(eq(schema.trialFactors.trialId, trialId));
    let layout: FieldLayout;
    try {
      layout = drawLayout(trial, treatments, factors, { blockCount: input.blockCount, arrangement: input.arrangement, seed });
    } catch (error) {
      if (error instanceof DesignError) throw error;
      throw new DesignError(error instanceof Error ? error.message : String(error));
    }
    await clearLayout(tx, trialId);
    // A completely randomized design has no blocks; its plots sit in one block row so every plot has one.
    const blockNumbers = [...new Set(layout.plots.map((p) => p.block ?? 1))];
    const blocks = await tx
      .insert(schema.blocks)
      .values(blockNumbers.map((number) => ({ trialId, number })))
      .returning();
    const blockId = new Map(blocks.map((b) => [b.number, b.id]));
    const treatmentId = new Map(treatments.map((t) => [t.code, t.id]));
    await tx.insert(schema.plots).values(
      layout.plots.map((p) => ({
        trialId,
        blockId: blockId.get(p.block ?? 1)!,
        treatmentId: treatmentId.get(p.treatment)!,
        plotNumber: p.plotNumber,
        positionInBlock: p.position,
        mainPlotNumber: p.mainPlot ?? null,
        ...fieldCell(p, input.blockOrientation),
      })),
    );
    await tx
      .update(schema.trials)
      .set({
        randomizationSeed: seed,
        blockCount: input.blockCount,
        arrangement: input.arrangement,
        blockOrientation: input.blockOrientation,
        updatedAt: new Date(),
      })
      .where(eq(schema.trials.id, trialId));
    await recordAudit(
      {
        programId: trial.programId,
        trialId,
        actorId,
        action: "randomize",
        entity: "layout",
        entityId: trialId,
        details: { seed, design: trial.design, blocks: input.blockCount, arrangement: input.arrangement, blockOrientation: input.blockOrientation, plots: layout.plots.length, previousSeed: trial.randomizationSeed },
      },
      tx,
    );
    return { seed, plots: layout.plots.length };
  });
}

/** Fixes the plots: the trial becomes locked and every later design edit is refused. */
export async function lockDesign(actorId: string, trialId: string) {
  return db.transaction(async (tx) => {
    const trial = await getTrialForUpdate(tx, trialId);
    assertDraft(trial);
    const [plot] = await tx.select({ id: schema.plots.id }).from(schema.plots).where(eq(schema.plots.trialId, trialId)).limit(1);
    if (!plot || trial.randomizationSeed === null) throw new DesignError("Randomize the layout before locking it.");
    const lockedAt = new Date();
    await tx.update(schema.trials).set({ status: "locked", lockedAt, updatedAt: lockedAt }).where(eq(schema.trials.id, trialId));
    await recordAudit(
      { programId: trial.programId, trialId, actorId, action: "lock", entity: "layout", entityId: trialId, details: { seed: trial.randomizationSeed } },
      tx,
    );
    return lockedAt;
  });
}

/** Sampling events on a trial's plots: once there is one, its layout is fixed for good. */
export async function samplingEventCount(trialId: string, tx: Pick<typeof db, "select"> = db): Promise<number> {
  const [{ n }] = await tx.select({ n: count() }).from(schema.samplingEvents).where(eq(schema.samplingEvents.trialId, trialId));
  return n;
}

/**
 * Reopens a locked design for a correction found before anyone sampled it (a wrong plot size, a
 * missing treatment). The reason goes into the audit log. Once a sampling event exists its sample
 * codes and measurements name the plots, so the layout stays fixed.
 */
export async function unlockDesign(actorId: string, trialId: string, reason: string) {
  return db.transaction(async (tx) => {
    const trial = await getTrialForUpdate(tx, trialId);
    if (trial.status === "draft") throw new DesignError("The design is not locked.");
    if (trial.status !== "locked") throw new DesignError("Only a locked trial that is not yet running can be unlocked; this one is under way, so its design stays fixed.");
    const events = await samplingEventCount(trialId, tx);
    if (events > 0) {
      throw new DesignError(`Samples have been planned or taken on these plots (${events} sampling event${events === 1 ? "" : "s"}), so the layout stays fixed: sample codes and measurements name its plots.`);
    }
    await tx.update(schema.trials).set({ status: "draft", lockedAt: null, updatedAt: new Date() }).where(eq(schema.trials.id, trialId));
    await recordAudit({ programId: trial.programId, trialId, actorId, action: "unlock", entity: "layout", entityId: trialId, details: { reason, seed: trial.randomizationSeed } }, tx);
  });
}

/** Turns the plot map to the field: the compass bearing its top faces (only the drawing changes; audited). */
export async function setMapBearing(actorId: string, trialId: string, bearingDeg: number) {
  return db.transaction(async (tx) => {
    const trial = await getTrialForUpdate(tx, trialId);
    if (trial.mapBearingDeg === bearingDeg) return;
    await tx.update(schema.trials).set({ mapBearingDeg: bearingDeg, updatedAt: new Date() }).where(eq(schema.trials.id, trialId));
    await recordAudit({ programId: trial.programId, trialId, actorId, action: "update", entity: "plot_map", entityId: trialId, details: { before: { bearingDeg: trial.mapBearingDeg }, after: { bearingDeg } } }, tx);
  });
}

export async function plotCount(trialId: string): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(schema.plots).where(eq(schema.plots.trialId, trialId));
  return n;
}

/** Everything the plot map draws, or null for a trial without plots. */
export async function plotMapData(trialId: string, unitSystem: "si" | "us"): Promise<PlotMapData | null> {
  const [row] = await db
    .select({ trial: schema.trials, siteName: schema.sites.name })
    .from(schema.trials)
    .leftJoin(schema.sites, eq(schema.sites.id, schema.trials.siteId))
    .where(eq(schema.trials.id, trialId));
  if (!row) return null;
  const { trial } = row;
  const treatments = await db
    .select({ id: schema.treatments.id, code: schema.treatments.code, name: schema.treatments.name, isCheck: schema.treatments.isCheck })
    .from(schema.treatments)
    .where(eq(schema.treatments.trialId, trialId))
    .orderBy(asc(schema.treatments.position), asc(schema.treatments.code));
  const plots = await db
    .select({
      plotNumber: schema.plots.plotNumber,
      block: schema.blocks.number,
      position: schema.plots.positionInBlock,
      mainPlot: schema.plots.mainPlotNumber,
      fieldRow: schema.plots.fieldRow,
      fieldColumn: schema.plots.fieldColumn,
      treatment: schema.treatments.code,
    })
    .from(schema.plots)
    .innerJoin(schema.blocks, eq(schema.blocks.id, schema.plots.blockId))
    .innerJoin(schema.treatments, eq(schema.treatments.id, schema.plots.treatmentId))
    .where(eq(schema.plots.trialId, trialId))
    .orderBy(asc(schema.plots.plotNumber));
  return {
    trial: {
      id: trial.id,
      title: trial.title,
      status: trial.status,
      design: trial.design,
      seed: trial.randomizationSeed,
      arrangement: trial.arrangement,
      blockOrientation: trial.blockOrientation,
      mapBearingDeg: trial.mapBearingDeg,
      plotLengthM: trial.plotLengthM ?? 0,
      plotWidthM: trial.plotWidthM ?? 0,
      alleyBetweenPlotsM: trial.alleyBetweenPlotsM ?? 0,
      alleyBetweenBlocksM: trial.alleyBetweenBlocksM ?? 0,
      lockedAt: trial.lockedAt?.toISOString() ?? null,
      siteName: row.siteName,
    },
    unitSystem,
    treatments: treatments.map(({ code, name, isCheck }) => ({ code, name, isCheck })),
    plots,
  };
}
