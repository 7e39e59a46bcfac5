// Writes the demo scenario (datasets/demo/scenario.ts) into an empty database, in one transaction.
import { randomUUID } from "node:crypto";
import { hashPassword } from "better-auth/crypto";
import { count, eq } from "drizzle-orm";
import { rcbdLayout } from "../../analysis/design";
import {
  DEMO_PASSWORD,
  demoAmendments,
  demoBrief,
  demoApplications,
  demoLayoutSeed,
  demoProgram,
  demoSite,
  demoTreatments,
  demoTrial,
  demoUsers,
} from "../../datasets/demo/scenario";
import { recordAudit } from "./audit";
import { publishBrief } from "./briefs";
import { db, schema } from "./db";
import { seedDemoMeasurements } from "./intake/demo";

export async function isEmpty(): Promise<boolean> {
  const [row] = await db.select({ n: count() }).from(schema.users);
  return row.n === 0;
}

export async function seedDemo(options: { withBrief?: boolean } = {}) {
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const written = await db.transaction(async (tx) => {
    const programId = randomUUID();
    await tx.insert(schema.programs).values({ id: programId, ...demoProgram });
    const userIds: Record<string, string> = {};
    for (const u of demoUsers) {
      const id = randomUUID();
      userIds[u.role] = id;
      await tx.insert(schema.users).values({ id, name: u.name, email: u.email, emailVerified: true, isAdmin: u.isAdmin });
      await tx
        .insert(schema.accounts)
        .values({ id: randomUUID(), accountId: id, providerId: "credential", userId: id, password: passwordHash });
      await tx.insert(schema.members).values({ id: randomUUID(), organizationId: programId, userId: id, role: u.role });
    }
    const [site] = await tx.insert(schema.sites).values({ programId, ...demoSite }).returning();
    const [trial] = await tx
      .insert(schema.trials)
      .values({ programId, siteId: site.id, createdBy: userIds.researcher, ...demoTrial })
      .returning();
    const treatments = await tx
      .insert(schema.treatments)
      .values(demoTreatments.map((t, position) => ({ trialId: trial.id, position, ...t })))
      .returning();
    const treatmentId = Object.fromEntries(treatments.map((t) => [t.code, t.id]));

    // Amendments, batches and what each treatment applies.
    const batchId: Record<string, string> = {};
    for (const { batches, ...amendment } of demoAmendments) {
      const [row] = await tx.insert(schema.amendments).values({ programId, ...amendment }).returning();
      for (const batch of batches) {
        const [b] = await tx.insert(schema.amendmentBatches).values({ amendmentId: row.id, ...batch }).returning();
        batchId[batch.label] = b.id;
      }
    }
    for (const [code, applications] of Object.entries(demoApplications)) {
      for (const { batch, ...rest } of applications) {
        await tx.insert(schema.treatmentApplications).values({ treatmentId: treatmentId[code], batchId: batchId[batch], ...rest });
      }
    }

    // The locked 6 × 4 RCBD layout: blocks as field rows, plot numbers block × 100 + position.
    const layout = rcbdLayout({ treatments: demoTreatments.map((t) => t.code), blocks: demoTrial.blockCount, seed: demoLayoutSeed });
    const blocks = await tx
      .insert(schema.blocks)
      .values(Array.from({ length: demoTrial.blockCount }, (_, i) => ({ trialId: trial.id, number: i + 1 })))
      .returning();
    const blockId = Object.fromEntries(blocks.map((b) => [b.number, b.id]));
    await tx.insert(schema.plots).values(
      layout.plots.map((p) => ({
        trialId: trial.id,
        blockId: blockId[p.block ?? 1],
        treatmentId: treatmentId[p.treatment],
        plotNumber: p.plotNumber,
        positionInBlock: p.position,
        fieldRow: (p.block ?? 1) - 1,
        fieldColumn: p.column - 1,
      })),
    );
    await tx
      .update(schema.trials)
      .set({ randomizationSeed: demoLayoutSeed, status: "locked", lockedAt: new Date("2025-03-15T12:00:00Z") })
      .where(eq(schema.trials.id, trial.id));
    await recordAudit(
      { programId, trialId: trial.id, actorId: userIds.owner, action: "seed", entity: "demo", details: { scenario: "Cedar Hollow" } },
      tx,
    );
    return { programId, trialId: trial.id, userIds };
  });
  // Lab results go in afterwards through lab intake's own code path (datasets/demo/measurements.ts).
  await seedDemoMeasurements({
    programId: written.programId,
    trialId: written.trialId,
    technicianId: written.userIds.technician,
    researcherId: written.userIds.researcher,
  });
  if (options.withBrief) {
    // A first field brief, so extension agents find something to read in the demo.
    await publishBrief({ id: written.userIds.researcher, programId: written.programId }, written.trialId, {
      ...demoBrief,
      briefId: null,
      notify: false,
    });
  }
  return written;
}
