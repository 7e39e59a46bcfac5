// Writes the demo scenario (datasets/demo/scenario.ts) into an empty database, in one transaction.
import { randomUUID } from "node:crypto";
import { hashPassword } from "better-auth/crypto";
import { count } from "drizzle-orm";
import {
  DEMO_PASSWORD,
  demoProgram,
  demoSite,
  demoTreatments,
  demoTrial,
  demoUsers,
} from "../../datasets/demo/scenario";
import { recordAudit } from "./audit";
import { db, schema } from "./db";

export async function isEmpty(): Promise<boolean> {
  const [row] = await db.select({ n: count() }).from(schema.users);
  return row.n === 0;
}

export async function seedDemo() {
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  return db.transaction(async (tx) => {
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
    await tx
      .insert(schema.treatments)
      .values(demoTreatments.map((t, position) => ({ trialId: trial.id, position, ...t })));
    await recordAudit(
      { programId, trialId: trial.id, actorId: userIds.owner, action: "seed", entity: "demo", details: { scenario: "Cedar Hollow" } },
      tx,
    );
    return { programId, trialId: trial.id, userIds };
  });
}
