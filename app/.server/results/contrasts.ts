// Saved contrasts of a trial: stored per treatment code, tested on the means of the current analysis.
import { and, asc, eq } from "drizzle-orm";
import { contrastPresets, nonOrthogonalPairs, testTreatmentContrasts, type ContrastOutcome, type TreatmentContrast } from "../../../analysis/treatment-contrasts";
import { recordAudit } from "../audit";
import { db, schema } from "../db";
import { ResultsError, trialData, trialFit, type ResultsQuery } from "./service";

export type SavedContrast = TreatmentContrast & { id: string };

export async function listContrasts(trialId: string): Promise<SavedContrast[]> {
  return db
    .select({ id: schema.contrasts.id, name: schema.contrasts.name, coefficients: schema.contrasts.coefficients })
    .from(schema.contrasts)
    .where(eq(schema.contrasts.trialId, trialId))
    .orderBy(asc(schema.contrasts.createdAt), asc(schema.contrasts.name));
}

async function programOf(trialId: string): Promise<string> {
  const [trial] = await db.select({ programId: schema.trials.programId }).from(schema.trials).where(eq(schema.trials.id, trialId));
  if (!trial) throw new ResultsError("No such trial.");
  return trial.programId;
}

/** Saves a contrast, replacing one of the same name. Coefficients are validated by the caller. */
export async function saveContrast(trialId: string, actorId: string, contrast: TreatmentContrast): Promise<"added" | "replaced"> {
  const programId = await programOf(trialId);
  return db.transaction(async (tx) => {
    const [existing] = await tx
      .select({ id: schema.contrasts.id })
      .from(schema.contrasts)
      .where(and(eq(schema.contrasts.trialId, trialId), eq(schema.contrasts.name, contrast.name)));
    const [row] = existing
      ? await tx.update(schema.contrasts).set({ coefficients: contrast.coefficients }).where(eq(schema.contrasts.id, existing.id)).returning()
      : await tx.insert(schema.contrasts).values({ trialId, name: contrast.name, coefficients: contrast.coefficients, createdBy: actorId }).returning();
    await recordAudit(
      { programId, trialId, actorId, action: existing ? "update" : "add", entity: "contrast", entityId: row.id, details: { ...contrast } },
      tx,
    );
    return existing ? "replaced" : "added";
  });
}

/** Adds a preset set; names already saved are left as they are. */
export async function addPreset(trialId: string, actorId: string, presetId: string): Promise<{ added: string[]; kept: string[] }> {
  const data = await trialData(trialId);
  const preset = contrastPresets(data.treatments).presets.find((p) => p.id === presetId);
  if (!preset) throw new ResultsError("That preset is not available for this trial's treatments.");
  const programId = await programOf(trialId);
  return db.transaction(async (tx) => {
    const saved = new Set(
      (await tx.select({ name: schema.contrasts.name }).from(schema.contrasts).where(eq(schema.contrasts.trialId, trialId))).map((r) => r.name),
    );
    const fresh = preset.contrasts.filter((c) => !saved.has(c.name));
    if (fresh.length > 0) {
      await tx.insert(schema.contrasts).values(fresh.map((c) => ({ trialId, name: c.name, coefficients: c.coefficients, createdBy: actorId })));
      await recordAudit({ programId, trialId, actorId, action: "add", entity: "contrast", details: { preset: preset.label, names: fresh.map((c) => c.name) } }, tx);
    }
    return { added: fresh.map((c) => c.name), kept: preset.contrasts.filter((c) => saved.has(c.name)).map((c) => c.name) };
  });
}

export async function deleteContrast(trialId: string, actorId: string, contrastId: string): Promise<string | null> {
  const programId = await programOf(trialId);
  return db.transaction(async (tx) => {
    const [row] = await tx
      .delete(schema.contrasts)
      .where(and(eq(schema.contrasts.trialId, trialId), eq(schema.contrasts.id, contrastId)))
      .returning();
    if (!row) return null;
    await recordAudit({ programId, trialId, actorId, action: "delete", entity: "contrast", entityId: row.id, details: { name: row.name } }, tx);
    return row.name;
  });
}

export type ContrastsView = {
  contrasts: SavedContrast[];
  /** Pairs of saved contrasts that are not orthogonal (empty when the set is). */
  nonOrthogonal: { a: string; b: string; product: number }[];
  /** Tests on the current analysis's treatment means, or why there are none. */
  outcomes: (ContrastOutcome & { id: string })[];
  analysisError: string | null;
  /** Label of the analysis the contrasts are tested in, e.g. "SOM, 0–10 cm, 2027 fall". */
  analysisLabel: string | null;
  unit: string | null;
  alpha: number;
};

/** The trial's saved contrasts and their tests in the analysis the query selects. */
export async function contrastsView(trialId: string, query: ResultsQuery): Promise<ContrastsView> {
  const [data, contrasts] = await Promise.all([trialData(trialId), listContrasts(trialId)]);
  const codes = data.treatments.map((t) => t.code);
  const nonOrthogonal = nonOrthogonalPairs(contrasts, codes);
  const empty = { contrasts, nonOrthogonal, outcomes: [], alpha: query.alpha };
  try {
    const { selection, fitted } = await trialFit(trialId, query);
    const tested = testTreatmentContrasts(fitted, contrasts, query.alpha);
    const unit = query.model === "rate_of_change" ? `${selection.variable.unit}/yr` : selection.variable.unit;
    const label = [selection.variable.label, selection.depth.label, fitted.payload.season ?? fitted.payload.modelLabel].join(", ");
    return { ...empty, outcomes: tested.map((o, i) => ({ ...o, id: contrasts[i].id })), analysisError: null, analysisLabel: label, unit };
  } catch (error) {
    if (error instanceof ResultsError) return { ...empty, analysisError: error.message, analysisLabel: null, unit: null };
    throw error;
  }
}
