// Trials: create, edit, status. Everything that shapes the plots is refused once the design is locked.
import { and, asc, count, desc, eq, inArray } from "drizzle-orm";
import { recordAudit } from "../audit";
import { db, schema, type Db, type Tx } from "../db";
import { DesignError } from "./errors";
import type { TrialInput } from "./inputs";

export type Trial = typeof schema.trials.$inferSelect;

export async function getTrial(trialId: string, tx: Db | Tx = db): Promise<Trial | null> {
  const [trial] = await tx.select().from(schema.trials).where(eq(schema.trials.id, trialId));
  return trial ?? null;
}

/** Same trial, read with a row lock so two edits of one design cannot interleave. */
export async function getTrialForUpdate(tx: Tx, trialId: string): Promise<Trial> {
  const [trial] = await tx.select().from(schema.trials).where(eq(schema.trials.id, trialId)).for("update");
  if (!trial) throw new DesignError("No such trial.");
  return trial;
}

export function lockedMessage(trial: Pick<Trial, "lockedAt">): string {
  const when = trial.lockedAt ? ` on ${trial.lockedAt.toISOString().slice(0, 10)}` : "";
  return (
    `The design of this trial was locked${when}: plots, treatments, applications, blocks and plot size can no longer ` +
    "change. Title, objective, hypotheses and status still can."
  );
}

/** Throws the clear refusal when the trial is past draft. */
export function assertDraft(trial: Pick<Trial, "status" | "lockedAt">): void {
  if (trial.status !== "draft") throw new DesignError(lockedMessage(trial));
}

async function assertSiteInProgram(tx: Db | Tx, programId: string, siteId: string | null) {
  if (!siteId) return;
  const [site] = await tx
    .select({ id: schema.sites.id })
    .from(schema.sites)
    .where(and(eq(schema.sites.id, siteId), eq(schema.sites.programId, programId)));
  if (!site) throw new DesignError("Choose one of this program's sites.", "siteId");
}

export async function createTrial(actorId: string, programId: string, input: TrialInput): Promise<Trial> {
  return db.transaction(async (tx) => {
    await assertSiteInProgram(tx, programId, input.siteId);
    const [trial] = await tx
      .insert(schema.trials)
      .values({ programId, createdBy: actorId, ...input })
      .returning();
    await recordAudit(
      { programId, trialId: trial.id, actorId, action: "create", entity: "trial", entityId: trial.id, details: { title: input.title, design: input.design } },
      tx,
    );
    return trial;
  });
}

/** Fields that shape the plots: fixed once the design is locked. */
const STRUCTURAL = ["siteId", "design", "plotLengthM", "plotWidthM", "alleyBetweenPlotsM", "alleyBetweenBlocksM", "blockCount"] as const;

/** Saves the trial form; once locked only title, objective and hypotheses may change (others are refused). */
export async function updateTrial(actorId: string, trialId: string, input: Partial<TrialInput>): Promise<Trial> {
  return db.transaction(async (tx) => {
    const trial = await getTrialForUpdate(tx, trialId);
    const changed = (Object.keys(input) as (keyof TrialInput)[]).filter((k) => input[k] !== undefined && input[k] !== trial[k]);
    const structural = changed.filter((k) => (STRUCTURAL as readonly string[]).includes(k));
    if (trial.status !== "draft" && structural.length > 0) throw new DesignError(lockedMessage(trial), structural[0]);
    if (input.siteId !== undefined) await assertSiteInProgram(tx, trial.programId, input.siteId);
    if (changed.length === 0) return trial;
    // A new design or block count makes the drawn layout stale: clear it so nobody prints an old map.
    const staleLayout = changed.some((k) => k === "design" || k === "blockCount");
    if (staleLayout) await clearLayout(tx, trialId);
    const [updated] = await tx
      .update(schema.trials)
      .set({ ...input, ...(staleLayout ? { randomizationSeed: null } : {}), updatedAt: new Date() })
      .where(eq(schema.trials.id, trialId))
      .returning();
    await recordAudit(
      {
        programId: trial.programId,
        trialId,
        actorId,
        action: "update",
        entity: "trial",
        entityId: trialId,
        details: Object.fromEntries(changed.map((k) => [k, { from: trial[k], to: input[k] }])),
      },
      tx,
    );
    return updated;
  });
}

/** Allowed status moves. Locking (draft → locked) happens on the randomization page, with its checks. */
export const STATUS_MOVES: Record<Trial["status"], Trial["status"][]> = {
  draft: [],
  locked: ["running"],
  running: ["closed"],
  closed: [],
};

export async function changeStatus(actorId: string, trialId: string, to: Trial["status"]): Promise<Trial> {
  return db.transaction(async (tx) => {
    const trial = await getTrialForUpdate(tx, trialId);
    if (to === trial.status) return trial;
    if (!STATUS_MOVES[trial.status].includes(to)) {
      const hint =
        trial.status === "draft"
          ? "Lock the design on the Randomization page first; a draft becomes locked there."
          : `A ${trial.status} trial can only move to ${STATUS_MOVES[trial.status].join(" or ") || "no other status"}.`;
      throw new DesignError(`The status cannot go from ${trial.status} to ${to}. ${hint}`, "status");
    }
    const [updated] = await tx
      .update(schema.trials)
      .set({ status: to, updatedAt: new Date() })
      .where(eq(schema.trials.id, trialId))
      .returning();
    await recordAudit(
      { programId: trial.programId, trialId, actorId, action: "change-status", entity: "trial", entityId: trialId, details: { from: trial.status, to } },
      tx,
    );
    return updated;
  });
}

/** Removes the drawn plots and blocks of a draft trial (they are redrawn by randomizing). */
export async function clearLayout(tx: Tx, trialId: string): Promise<number> {
  const [{ n }] = await tx.select({ n: count() }).from(schema.plots).where(eq(schema.plots.trialId, trialId));
  if (n === 0) return 0;
  await tx.delete(schema.plots).where(eq(schema.plots.trialId, trialId));
  await tx.delete(schema.blocks).where(eq(schema.blocks.trialId, trialId));
  return n;
}

export async function listSitesOf(programId: string) {
  return db
    .select({ id: schema.sites.id, name: schema.sites.name })
    .from(schema.sites)
    .where(eq(schema.sites.programId, programId))
    .orderBy(asc(schema.sites.name));
}

/** Audit entities that belong to a trial's design (the Audit log tab shows everything). */
const DESIGN_ENTITIES = ["trial", "treatment", "application", "factor", "layout"];

/** The trial's recent design changes with who made them, newest first. */
export async function trialHistory(trialId: string, limit = 30) {
  return db
    .select({
      id: schema.auditLog.id,
      action: schema.auditLog.action,
      entity: schema.auditLog.entity,
      details: schema.auditLog.details,
      at: schema.auditLog.at,
      actor: schema.users.name,
    })
    .from(schema.auditLog)
    .leftJoin(schema.users, eq(schema.users.id, schema.auditLog.actorId))
    .where(and(eq(schema.auditLog.trialId, trialId), inArray(schema.auditLog.entity, DESIGN_ENTITIES)))
    .orderBy(desc(schema.auditLog.at), desc(schema.auditLog.id))
    .limit(limit);
}
