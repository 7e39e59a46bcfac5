// A program's LOI lab methods (with their SOM calibration) and its registered custom variables,
// and each trial's choice of carbon method. Changing how carbon is derived changes every derived
// value, so it moves the trial's data version (results and reviews are recomputed).
import { and, asc, eq, sql } from "drizzle-orm";
import { recordAudit } from "./audit";
import { db, schema } from "./db";

export async function listLabMethods(programId: string) {
  return db.select().from(schema.labMethods).where(eq(schema.labMethods.programId, programId)).orderBy(asc(schema.labMethods.name));
}

export async function listCustomVariables(programId: string) {
  return db.select().from(schema.customVariables).where(eq(schema.customVariables.programId, programId)).orderBy(asc(schema.customVariables.label));
}

export class LabMethodError extends Error {
  constructor(
    message: string,
    readonly field?: string,
  ) {
    super(message);
  }
}

export async function addLabMethod(
  actorId: string,
  programId: string,
  input: { name: string; ignitionC: number | null; ignitionHours: number | null; somSlope: number; somIntercept: number; notes: string | null },
) {
  await db.transaction(async (tx) => {
    const [clash] = await tx
      .select({ id: schema.labMethods.id })
      .from(schema.labMethods)
      .where(and(eq(schema.labMethods.programId, programId), eq(schema.labMethods.name, input.name)));
    if (clash) throw new LabMethodError("This program already has a lab method with that name.", "name");
    const [row] = await tx.insert(schema.labMethods).values({ programId, ...input }).returning();
    await recordAudit({ programId, actorId, action: "create", entity: "lab-method", entityId: row.id, details: input }, tx);
  });
}

export async function addCustomVariable(
  actorId: string,
  programId: string,
  input: { variableId: string; label: string; unit: string; decimals: number; minValue: number | null; maxValue: number | null; description: string | null },
) {
  await db.transaction(async (tx) => {
    const [clash] = await tx
      .select({ id: schema.customVariables.id })
      .from(schema.customVariables)
      .where(and(eq(schema.customVariables.programId, programId), eq(schema.customVariables.variableId, input.variableId)));
    if (clash) throw new LabMethodError("This program already has a variable with that id.", "variableId");
    const [row] = await tx.insert(schema.customVariables).values({ programId, ...input }).returning();
    await recordAudit({ programId, actorId, action: "create", entity: "variable", entityId: row.id, details: input }, tx);
  });
}

/** Sets a trial's SOC factor and lab method in one transaction, with an audit entry and a new data version. */
export async function setCarbonMethod(actorId: string, trialId: string, input: { socFactor: number; labMethodId: string | null }) {
  await db.transaction(async (tx) => {
    const [trial] = await tx.select().from(schema.trials).where(eq(schema.trials.id, trialId)).for("update");
    if (!trial) throw new LabMethodError("No such trial.");
    if (input.labMethodId) {
      const [method] = await tx
        .select({ id: schema.labMethods.id })
        .from(schema.labMethods)
        .where(and(eq(schema.labMethods.id, input.labMethodId), eq(schema.labMethods.programId, trial.programId)));
      if (!method) throw new LabMethodError("Choose one of this program's lab methods.", "labMethodId");
    }
    if (trial.socFactor === input.socFactor && trial.labMethodId === input.labMethodId) return;
    await tx
      .update(schema.trials)
      .set({ socFactor: input.socFactor, labMethodId: input.labMethodId, dataVersion: sql`${schema.trials.dataVersion} + 1`, updatedAt: new Date() })
      .where(eq(schema.trials.id, trialId));
    await recordAudit(
      {
        programId: trial.programId,
        trialId,
        actorId,
        action: "change-carbon-method",
        entity: "trial",
        entityId: trialId,
        details: { before: { socFactor: trial.socFactor, labMethodId: trial.labMethodId }, after: input },
      },
      tx,
    );
  });
}
