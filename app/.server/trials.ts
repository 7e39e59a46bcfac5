import { asc, eq, inArray } from "drizzle-orm";
import { db, schema } from "./db";
import { sharedRead } from "./request-context";

const trialListing = {
  id: schema.trials.id,
  title: schema.trials.title,
  status: schema.trials.status,
  design: schema.trials.design,
  siteName: schema.sites.name,
  updatedAt: schema.trials.updatedAt,
};

export async function listTrials(programId: string) {
  return db
    .select(trialListing)
    .from(schema.trials)
    .leftJoin(schema.sites, eq(schema.sites.id, schema.trials.siteId))
    .where(eq(schema.trials.programId, programId))
    .orderBy(asc(schema.trials.title));
}

/** The trials of several programs in one query, by program (the home page lists every program's trials). */
export async function listTrialsByProgram(programIds: string[]) {
  const byProgram = new Map(programIds.map((id) => [id, [] as Awaited<ReturnType<typeof listTrials>>]));
  if (programIds.length === 0) return byProgram;
  const rows = await db
    .select({ ...trialListing, programId: schema.trials.programId })
    .from(schema.trials)
    .leftJoin(schema.sites, eq(schema.sites.id, schema.trials.siteId))
    .where(inArray(schema.trials.programId, programIds))
    .orderBy(asc(schema.trials.title));
  for (const { programId, ...trial } of rows) byProgram.get(programId)?.push(trial);
  return byProgram;
}

export async function listSites(programId: string) {
  return db.select().from(schema.sites).where(eq(schema.sites.programId, programId)).orderBy(asc(schema.sites.name));
}

/** A trial with its site and treatments; read once per request (the trial layout and its pages both need it). */
export function getTrialOverview(request: Request, trialId: string) {
  return sharedRead(request, `trial-overview|${trialId}`, () => readTrialOverview(trialId));
}

async function readTrialOverview(trialId: string) {
  const [[row], treatments] = await Promise.all([
    db
      .select({ trial: schema.trials, site: schema.sites })
      .from(schema.trials)
      .leftJoin(schema.sites, eq(schema.sites.id, schema.trials.siteId))
      .where(eq(schema.trials.id, trialId)),
    db
      .select()
      .from(schema.treatments)
      .where(eq(schema.treatments.trialId, trialId))
      .orderBy(asc(schema.treatments.position), asc(schema.treatments.code)),
  ]);
  return row ? { trial: row.trial, site: row.site, treatments } : null;
}
