// Treatments, what each applies, and the factors of factorial and split-plot trials.
import { and, asc, eq, inArray, max } from "drizzle-orm";
import { factorialCombinations, LEVEL_SEPARATOR } from "../../../analysis/design";
import { recordAudit } from "../audit";
import { db, schema, type Tx } from "../db";
import { orderedFactors } from "./draw";
import { DesignError } from "./errors";
import { assertDraft, clearLayout, getTrialForUpdate, type Trial } from "./trials";

export type TreatmentInput = { code: string; name: string; description: string | null; isCheck: boolean };

export type ApplicationInput = {
  batchId: string;
  rateMgDmPerHa: number | null;
  layerDepthCm: number | null;
  timing: "once" | "each_season" | "every_n_weeks";
  everyNWeeks: number | null;
  notes: string | null;
};

/** Treatments of a trial in order, each with its applications (batch and amendment named). */
export async function listTreatments(trialId: string) {
  const treatments = await db
    .select()
    .from(schema.treatments)
    .where(eq(schema.treatments.trialId, trialId))
    .orderBy(asc(schema.treatments.position), asc(schema.treatments.code));
  const ids = treatments.map((t) => t.id);
  const applications = ids.length
    ? await db
        .select({
          id: schema.treatmentApplications.id,
          treatmentId: schema.treatmentApplications.treatmentId,
          rateMgDmPerHa: schema.treatmentApplications.rateMgDmPerHa,
          layerDepthCm: schema.treatmentApplications.layerDepthCm,
          timing: schema.treatmentApplications.timing,
          everyNWeeks: schema.treatmentApplications.everyNWeeks,
          notes: schema.treatmentApplications.notes,
          batchId: schema.amendmentBatches.id,
          batchLabel: schema.amendmentBatches.label,
          moistureWetBasisPct: schema.amendmentBatches.moistureWetBasisPct,
          totalCarbonDryPct: schema.amendmentBatches.totalCarbonDryPct,
          totalNitrogenDryPct: schema.amendmentBatches.totalNitrogenDryPct,
          amendmentId: schema.amendments.id,
          amendmentName: schema.amendments.name,
          material: schema.amendments.material,
        })
        .from(schema.treatmentApplications)
        .leftJoin(schema.amendmentBatches, eq(schema.amendmentBatches.id, schema.treatmentApplications.batchId))
        .leftJoin(schema.amendments, eq(schema.amendments.id, schema.amendmentBatches.amendmentId))
        .where(inArray(schema.treatmentApplications.treatmentId, ids))
        .orderBy(asc(schema.amendments.name), asc(schema.amendmentBatches.label))
    : [];
  return treatments.map((t) => ({ ...t, applications: applications.filter((a) => a.treatmentId === t.id) }));
}

export type TreatmentWithApplications = Awaited<ReturnType<typeof listTreatments>>[number];

async function draftTrial(tx: Tx, trialId: string): Promise<Trial> {
  const trial = await getTrialForUpdate(tx, trialId);
  assertDraft(trial);
  return trial;
}

async function treatmentOf(tx: Tx, trialId: string, treatmentId: string) {
  const [t] = await tx
    .select()
    .from(schema.treatments)
    .where(and(eq(schema.treatments.id, treatmentId), eq(schema.treatments.trialId, trialId)));
  if (!t) throw new DesignError("That treatment is not in this trial.");
  return t;
}

async function assertCodeFree(tx: Tx, trialId: string, code: string, exceptId?: string) {
  const [clash] = await tx
    .select({ id: schema.treatments.id })
    .from(schema.treatments)
    .where(and(eq(schema.treatments.trialId, trialId), eq(schema.treatments.code, code)));
  if (clash && clash.id !== exceptId) throw new DesignError(`Another treatment already has the code “${code}”.`, "code");
}

/** A trial has one untreated check: differences from the check, contrast presets and briefs compare against it. */
async function assertNoOtherCheck(tx: Tx, trialId: string, isCheck: boolean, exceptId?: string) {
  if (!isCheck) return;
  const [other] = await tx
    .select({ id: schema.treatments.id, code: schema.treatments.code, name: schema.treatments.name })
    .from(schema.treatments)
    .where(and(eq(schema.treatments.trialId, trialId), eq(schema.treatments.isCheck, true)));
  if (other && other.id !== exceptId) {
    throw new DesignError(
      `${other.code} (${other.name}) is already this trial's untreated check; differences and contrasts compare against one. Untick this, or make ${other.code} an ordinary treatment first.`,
      "isCheck",
    );
  }
}

/** Adds a treatment; a drawn layout no longer covers every treatment, so it is cleared. */
export async function addTreatment(actorId: string, trialId: string, input: TreatmentInput) {
  return db.transaction(async (tx) => {
    const trial = await draftTrial(tx, trialId);
    await assertCodeFree(tx, trialId, input.code);
    await assertNoOtherCheck(tx, trialId, input.isCheck);
    const [{ last }] = await tx
      .select({ last: max(schema.treatments.position) })
      .from(schema.treatments)
      .where(eq(schema.treatments.trialId, trialId));
    const [t] = await tx
      .insert(schema.treatments)
      .values({ trialId, ...input, position: (last ?? -1) + 1 })
      .returning();
    const cleared = await clearLayout(tx, trialId);
    await recordAudit(
      { programId: trial.programId, trialId, actorId, action: "add", entity: "treatment", entityId: t.id, details: { ...input, layoutCleared: cleared > 0 } },
      tx,
    );
    return { treatment: t, layoutCleared: cleared > 0 };
  });
}

export async function updateTreatment(actorId: string, trialId: string, treatmentId: string, input: TreatmentInput) {
  return db.transaction(async (tx) => {
    const trial = await draftTrial(tx, trialId);
    const before = await treatmentOf(tx, trialId, treatmentId);
    await assertCodeFree(tx, trialId, input.code, treatmentId);
    await assertNoOtherCheck(tx, trialId, input.isCheck, treatmentId);
    await tx.update(schema.treatments).set(input).where(eq(schema.treatments.id, treatmentId));
    await recordAudit(
      {
        programId: trial.programId,
        trialId,
        actorId,
        action: "update",
        entity: "treatment",
        entityId: treatmentId,
        details: { from: { code: before.code, name: before.name, description: before.description, isCheck: before.isCheck }, to: input },
      },
      tx,
    );
  });
}

export async function deleteTreatment(actorId: string, trialId: string, treatmentId: string) {
  return db.transaction(async (tx) => {
    const trial = await draftTrial(tx, trialId);
    const before = await treatmentOf(tx, trialId, treatmentId);
    const cleared = await clearLayout(tx, trialId);
    await tx.delete(schema.treatments).where(eq(schema.treatments.id, treatmentId));
    await recordAudit(
      { programId: trial.programId, trialId, actorId, action: "delete", entity: "treatment", entityId: treatmentId, details: { code: before.code, name: before.name, layoutCleared: cleared > 0 } },
      tx,
    );
    return { layoutCleared: cleared > 0 };
  });
}

export async function addApplication(actorId: string, trialId: string, treatmentId: string, input: ApplicationInput) {
  if (input.rateMgDmPerHa === null && input.layerDepthCm === null && input.timing !== "every_n_weeks") {
    throw new DesignError("Give a dry-matter rate or a layer depth (a drench every N weeks may have neither).", "rateMgDmPerHa");
  }
  if (input.rateMgDmPerHa !== null && input.layerDepthCm !== null) {
    throw new DesignError("Give either a dry-matter rate or a layer depth, not both.", "layerDepthCm");
  }
  if (input.timing === "every_n_weeks" && input.everyNWeeks === null) {
    throw new DesignError("Say how many weeks apart the applications are.", "everyNWeeks");
  }
  return db.transaction(async (tx) => {
    const trial = await draftTrial(tx, trialId);
    const treatment = await treatmentOf(tx, trialId, treatmentId);
    if (treatment.isCheck) throw new DesignError("The untreated check receives no amendment.", "batchId");
    const [batch] = await tx
      .select({ id: schema.amendmentBatches.id, label: schema.amendmentBatches.label })
      .from(schema.amendmentBatches)
      .innerJoin(schema.amendments, eq(schema.amendments.id, schema.amendmentBatches.amendmentId))
      .where(and(eq(schema.amendmentBatches.id, input.batchId), eq(schema.amendments.programId, trial.programId)));
    if (!batch) throw new DesignError("Choose one of this program's amendment batches.", "batchId");
    const [row] = await tx
      .insert(schema.treatmentApplications)
      .values({ treatmentId, ...input, everyNWeeks: input.timing === "every_n_weeks" ? input.everyNWeeks : null })
      .returning();
    await recordAudit(
      { programId: trial.programId, trialId, actorId, action: "add", entity: "application", entityId: row.id, details: { treatment: treatment.code, batch: batch.label, ...input } },
      tx,
    );
  });
}

export async function deleteApplication(actorId: string, trialId: string, applicationId: string) {
  return db.transaction(async (tx) => {
    const trial = await draftTrial(tx, trialId);
    const [row] = await tx
      .select({ id: schema.treatmentApplications.id, code: schema.treatments.code })
      .from(schema.treatmentApplications)
      .innerJoin(schema.treatments, eq(schema.treatments.id, schema.treatmentApplications.treatmentId))
      .where(and(eq(schema.treatmentApplications.id, applicationId), eq(schema.treatments.trialId, trialId)));
    if (!row) throw new DesignError("That application is not in this trial.");
    await tx.delete(schema.treatmentApplications).where(eq(schema.treatmentApplications.id, applicationId));
    await recordAudit(
      { programId: trial.programId, trialId, actorId, action: "delete", entity: "application", entityId: applicationId, details: { treatment: row.code } },
      tx,
    );
  });
}

// ----- factors -----

export async function listFactors(trialId: string) {
  return db
    .select()
    .from(schema.trialFactors)
    .where(eq(schema.trialFactors.trialId, trialId))
    .orderBy(asc(schema.trialFactors.position), asc(schema.trialFactors.name));
}

export type FactorInput = { name: string; levels: string[]; stratum: "main" | "sub" | null };

/** Splits "0, 10, 20" into levels; blanks dropped, order kept. */
export function parseLevels(text: string): string[] {
  return text
    .split(/[,;\n]/)
    .map((l) => l.trim())
    .filter(Boolean);
}

export async function addFactor(actorId: string, trialId: string, input: FactorInput) {
  if (input.levels.length < 2) throw new DesignError("A factor needs at least two levels, separated by commas.", "levels");
  if (new Set(input.levels).size !== input.levels.length) throw new DesignError("Each level may appear only once.", "levels");
  if (input.levels.some((l) => l.includes(LEVEL_SEPARATOR.trim()))) {
    throw new DesignError(`Levels may not contain “${LEVEL_SEPARATOR.trim()}”; it joins levels in treatment codes.`, "levels");
  }
  return db.transaction(async (tx) => {
    const trial = await draftTrial(tx, trialId);
    if (trial.design !== "factorial_rcbd" && trial.design !== "split_plot") {
      throw new DesignError("Factors belong to factorial and split-plot designs. Change the design on Setup first.", "name");
    }
    const factors = await tx.select().from(schema.trialFactors).where(eq(schema.trialFactors.trialId, trialId));
    if (factors.some((f) => f.name === input.name)) throw new DesignError(`There is already a factor called “${input.name}”.`, "name");
    if (trial.design === "split_plot") {
      if (factors.length >= 2) throw new DesignError("A split-plot design has exactly two factors: one on main plots, one on sub-plots.", "name");
      if (!input.stratum) throw new DesignError("Say whether this factor goes on main plots or on sub-plots.", "stratum");
      if (factors.some((f) => f.stratum === input.stratum)) {
        throw new DesignError(`The ${input.stratum === "main" ? "main-plot" : "sub-plot"} factor is already defined.`, "stratum");
      }
    }
    const [row] = await tx
      .insert(schema.trialFactors)
      .values({ trialId, name: input.name, levels: input.levels, stratum: trial.design === "split_plot" ? input.stratum : null, position: factors.length })
      .returning();
    await recordAudit(
      { programId: trial.programId, trialId, actorId, action: "add", entity: "factor", entityId: row.id, details: { ...input } },
      tx,
    );
  });
}

export async function deleteFactor(actorId: string, trialId: string, factorId: string) {
  return db.transaction(async (tx) => {
    const trial = await draftTrial(tx, trialId);
    const [row] = await tx
      .select()
      .from(schema.trialFactors)
      .where(and(eq(schema.trialFactors.id, factorId), eq(schema.trialFactors.trialId, trialId)));
    if (!row) throw new DesignError("That factor is not in this trial.");
    await tx.delete(schema.trialFactors).where(eq(schema.trialFactors.id, factorId));
    await recordAudit(
      { programId: trial.programId, trialId, actorId, action: "delete", entity: "factor", entityId: factorId, details: { name: row.name } },
      tx,
    );
  });
}

/**
 * Replaces the trial's treatments with every combination of its factors' levels (first factor
 * slowest). Applications of the old treatments go with them; the layout is cleared.
 */
export async function generateCombinations(actorId: string, trialId: string) {
  return db.transaction(async (tx) => {
    const trial = await draftTrial(tx, trialId);
    const factors = orderedFactors(await tx.select().from(schema.trialFactors).where(eq(schema.trialFactors.trialId, trialId)));
    if (trial.design === "split_plot" && factors.length !== 2) {
      throw new DesignError("A split-plot design needs its main-plot factor and its sub-plot factor before treatments can be generated.");
    }
    if (factors.length === 0) throw new DesignError("Add the factors and their levels first.");
    const combos = factorialCombinations(factors.map((f) => ({ name: f.name, levels: f.levels })));
    if (combos.length > 99) throw new DesignError(`${combos.length} combinations is more than the 99 plots a block can number.`);
    await clearLayout(tx, trialId);
    await tx.delete(schema.treatments).where(eq(schema.treatments.trialId, trialId));
    await tx.insert(schema.treatments).values(
      combos.map((c, position) => ({
        trialId,
        code: c.code,
        name: factors.map((f) => `${f.name} ${c.levels[f.name]}`).join(", "),
        factorLevels: c.levels,
        position,
      })),
    );
    await recordAudit(
      { programId: trial.programId, trialId, actorId, action: "generate", entity: "treatment", details: { combinations: combos.map((c) => c.code) } },
      tx,
    );
    return combos.length;
  });
}
