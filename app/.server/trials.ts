import { asc, eq } from "drizzle-orm";
import { db, schema } from "./db";

export async function listTrials(programId: string) {
  return db
    .select({
      id: schema.trials.id,
      title: schema.trials.title,
      status: schema.trials.status,
      design: schema.trials.design,
      siteName: schema.sites.name,
      updatedAt: schema.trials.updatedAt,
    })
    .from(schema.trials)
    .leftJoin(schema.sites, eq(schema.sites.id, schema.trials.siteId))
    .where(eq(schema.trials.programId, programId))
    .orderBy(asc(schema.trials.title));
}

export async function listSites(programId: string) {
  return db.select().from(schema.sites).where(eq(schema.sites.programId, programId)).orderBy(asc(schema.sites.name));
}

export async function getTrialOverview(trialId: string) {
  const [trial] = await db.select().from(schema.trials).where(eq(schema.trials.id, trialId));
  if (!trial) return null;
  const [site] = trial.siteId
    ? await db.select().from(schema.sites).where(eq(schema.sites.id, trial.siteId))
    : [undefined];
  const treatments = await db
    .select()
    .from(schema.treatments)
    .where(eq(schema.treatments.trialId, trialId))
    .orderBy(asc(schema.treatments.position), asc(schema.treatments.code));
  return { trial, site: site ?? null, treatments };
}
