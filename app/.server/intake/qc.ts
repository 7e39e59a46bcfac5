// QC decisions: a reviewer accepts or excludes a stored result, always with a reason. Excluded
// results stay stored and visible, marked, and drop out of derived values used in analysis.
import { and, eq, sql } from "drizzle-orm";
import { recordAudit } from "../audit";
import { db, schema } from "../db";
import { IntakeError } from "./errors";
import { currentMeasurement } from "./events";

export async function setMeasurementStatus(
  trialId: string,
  programId: string,
  actorId: string,
  measurementId: string,
  decision: "accept" | "exclude",
  reason: string,
): Promise<void> {
  if (!/^[0-9a-f-]{36}$/i.test(measurementId)) throw new IntakeError("No such result in this trial.", undefined, 404);
  await db.transaction(async (tx) => {
    await tx.select({ id: schema.trials.id }).from(schema.trials).where(eq(schema.trials.id, trialId)).for("update");
    const [m] = await tx
      .select({ id: schema.measurements.id, status: schema.measurements.status, statusReason: schema.measurements.statusReason, kind: schema.measurements.kind, code: schema.samples.code })
      .from(schema.measurements)
      .innerJoin(schema.samples, eq(schema.samples.id, schema.measurements.sampleId))
      .where(and(eq(schema.measurements.id, measurementId), eq(schema.samples.trialId, trialId)))
      .for("update");
    if (!m) throw new IntakeError("No such result in this trial.", undefined, 404);
    const [current] = await tx.select({ id: schema.measurements.id }).from(schema.measurements).where(and(eq(schema.measurements.id, measurementId), currentMeasurement()));
    if (!current) throw new IntakeError("This result was corrected since; decide on the current one.", undefined, 409);
    const status = decision === "exclude" ? "excluded" : "ok";
    await tx.update(schema.measurements).set({ status, statusReason: reason }).where(eq(schema.measurements.id, measurementId));
    await tx
      .update(schema.trials)
      .set({ dataVersion: sql`${schema.trials.dataVersion} + 1`, updatedAt: new Date() })
      .where(eq(schema.trials.id, trialId));
    await recordAudit(
      {
        programId,
        trialId,
        actorId,
        action: decision,
        entity: "measurement",
        entityId: measurementId,
        details: { sampleCode: m.code, kind: m.kind, before: { status: m.status, reason: m.statusReason }, after: { status, reason } },
      },
      tx,
    );
  });
}
