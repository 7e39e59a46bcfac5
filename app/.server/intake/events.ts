// Seasons, sampling events and their sample codes (one per plot × depth increment × event).
import { and, asc, count, eq, inArray, max, sql } from "drizzle-orm";
import { depthIncrementProblems, type DepthIncrement } from "../../../analysis/soil";
import { recordAudit } from "../audit";
import { db, schema, type Db, type Tx } from "../db";
import { IntakeError } from "./errors";

export interface NewSamplingEvent {
  seasonLabel: string;
  /** ISO date, yyyy-mm-dd. */
  eventDate: string;
  depths: DepthIncrement[];
  variables: string[];
  isBaseline: boolean;
}

/** The code printed on a bag: event number, plot number, depth, e.g. E2-103-10-20. */
export function sampleCode(eventNumber: number, plotNumber: number, depth: DepthIncrement): string {
  return `E${eventNumber}-${plotNumber}-${depth.topCm}-${depth.bottomCm}`;
}

/** The event's short name, taken from its sample codes ("E2"). */
export function eventCodeOf(code: string): string {
  return code.split("-")[0];
}

/** Parses "0-10, 10-20, 20-30" (hyphen, en dash or "to"; cm) into increments. */
export function parseDepths(text: string): DepthIncrement[] | string {
  const parts = text
    .split(/[,;\n]+/)
    .map((p) => p.trim())
    .filter(Boolean);
  if (parts.length === 0) return "Enter the depth increments, for example 0-10, 10-20, 20-30.";
  const depths: DepthIncrement[] = [];
  for (const part of parts) {
    const m = /^(\d+(?:\.\d+)?)\s*(?:-|–|—|to)\s*(\d+(?:\.\d+)?)\s*(?:cm)?$/i.exec(part);
    if (!m) return `“${part}” is not a depth increment; write top and bottom in cm like 10-20.`;
    depths.push({ topCm: Number(m[1]), bottomCm: Number(m[2]) });
  }
  const problems = depthIncrementProblems(depths);
  if (problems.length > 0) return problems.join(" ");
  return [...depths].sort((a, b) => a.topCm - b.topCm);
}

export async function listEvents(trialId: string) {
  const events = await db
    .select({
      id: schema.samplingEvents.id,
      eventDate: schema.samplingEvents.eventDate,
      isBaseline: schema.samplingEvents.isBaseline,
      depths: schema.samplingEvents.depths,
      variables: schema.samplingEvents.variables,
      seasonId: schema.seasons.id,
      season: schema.seasons.label,
      seasonOrdinal: schema.seasons.ordinal,
      firstCode: sql<string | null>`(select min(${schema.samples.code}) from ${schema.samples} where ${schema.samples.eventId} = ${schema.samplingEvents.id})`,
      sampleCount: sql<number>`(select count(*)::int from ${schema.samples} where ${schema.samples.eventId} = ${schema.samplingEvents.id})`,
    })
    .from(schema.samplingEvents)
    .innerJoin(schema.seasons, eq(schema.seasons.id, schema.samplingEvents.seasonId))
    .where(eq(schema.samplingEvents.trialId, trialId))
    .orderBy(asc(schema.samplingEvents.eventDate), asc(schema.samplingEvents.createdAt));
  const measured = events.length
    ? await db
        .select({ eventId: schema.samples.eventId, kind: schema.measurements.kind, n: count() })
        .from(schema.measurements)
        .innerJoin(schema.samples, eq(schema.samples.id, schema.measurements.sampleId))
        .where(and(inArray(schema.samples.eventId, events.map((e) => e.id)), currentMeasurement()))
        .groupBy(schema.samples.eventId, schema.measurements.kind)
    : [];
  return events.map((e) => ({
    ...e,
    code: e.firstCode ? eventCodeOf(e.firstCode) : "—",
    label: `${e.season} (${e.firstCode ? eventCodeOf(e.firstCode) : "—"})`,
    measured: Object.fromEntries(measured.filter((m) => m.eventId === e.id).map((m) => [m.kind, m.n])) as Record<string, number>,
  }));
}

/** Measurements not replaced by a later correction. */
export function currentMeasurement() {
  return sql`not exists (select 1 from ${schema.measurements} as newer where newer.supersedes = ${schema.measurements.id})`;
}

export async function listSeasons(trialId: string) {
  return db.select().from(schema.seasons).where(eq(schema.seasons.trialId, trialId)).orderBy(asc(schema.seasons.ordinal));
}

export async function getEvent(trialId: string, eventId: string) {
  if (!/^[0-9a-f-]{36}$/i.test(eventId)) return null;
  const events = await listEvents(trialId);
  return events.find((e) => e.id === eventId) ?? null;
}

/** The event's samples with their plot, block and treatment, in plot then depth order. */
export async function listEventSamples(eventId: string) {
  return db
    .select({
      id: schema.samples.id,
      code: schema.samples.code,
      topCm: schema.samples.topCm,
      bottomCm: schema.samples.bottomCm,
      plotNumber: schema.plots.plotNumber,
      block: schema.blocks.number,
      treatmentCode: schema.treatments.code,
      treatmentName: schema.treatments.name,
    })
    .from(schema.samples)
    .innerJoin(schema.plots, eq(schema.plots.id, schema.samples.plotId))
    .innerJoin(schema.blocks, eq(schema.blocks.id, schema.plots.blockId))
    .innerJoin(schema.treatments, eq(schema.treatments.id, schema.plots.treatmentId))
    .where(eq(schema.samples.eventId, eventId))
    .orderBy(asc(schema.plots.plotNumber), asc(schema.samples.topCm));
}

/**
 * Creates a sampling event (and its season when the label is new) with one sample code per plot
 * and depth increment, in one transaction. The baseline is the trial's one pre-treatment event:
 * it must come before every other event.
 */
export async function createSamplingEvent(
  trialId: string,
  actorId: string,
  input: NewSamplingEvent,
  tx?: Tx,
): Promise<{ eventId: string; eventCode: string; sampleCount: number }> {
  const run = async (t: Tx | Db) => {
    const [trial] = await t.select().from(schema.trials).where(eq(schema.trials.id, trialId)).for("update");
    if (!trial) throw new IntakeError("No such trial.", undefined, 404);
    const problems = depthIncrementProblems(input.depths);
    if (problems.length > 0) throw new IntakeError(problems.join(" "), "depths");
    const plots = await t.select().from(schema.plots).where(eq(schema.plots.trialId, trialId)).orderBy(asc(schema.plots.plotNumber));
    if (plots.length === 0) {
      throw new IntakeError("This trial has no plots yet. Lay out and lock the plot map first; sample codes are made per plot.", "seasonLabel");
    }
    const existing = await t
      .select({ eventDate: schema.samplingEvents.eventDate, isBaseline: schema.samplingEvents.isBaseline })
      .from(schema.samplingEvents)
      .where(eq(schema.samplingEvents.trialId, trialId));
    const baseline = existing.find((e) => e.isBaseline);
    if (input.isBaseline) {
      if (baseline) throw new IntakeError(`This trial already has its baseline event (${baseline.eventDate}); a trial has one.`, "isBaseline");
      const earlier = existing.filter((e) => e.eventDate <= input.eventDate);
      if (earlier.length > 0) {
        throw new IntakeError("The baseline is sampled before any amendment goes on, so it must be dated before every other sampling event.", "eventDate");
      }
    } else if (baseline && input.eventDate <= baseline.eventDate) {
      throw new IntakeError(`This date is not after the baseline (${baseline.eventDate}); events after treatment come after it.`, "eventDate");
    }
    let [season] = await t
      .select()
      .from(schema.seasons)
      .where(and(eq(schema.seasons.trialId, trialId), eq(schema.seasons.label, input.seasonLabel)));
    if (!season) {
      const [{ top }] = await t.select({ top: max(schema.seasons.ordinal) }).from(schema.seasons).where(eq(schema.seasons.trialId, trialId));
      [season] = await t.insert(schema.seasons).values({ trialId, label: input.seasonLabel, ordinal: (top ?? 0) + 1 }).returning();
    }
    const eventNumber = existing.length + 1;
    const [event] = await t
      .insert(schema.samplingEvents)
      .values({ trialId, seasonId: season.id, eventDate: input.eventDate, isBaseline: input.isBaseline, depths: input.depths, variables: input.variables })
      .returning();
    const samples = plots.flatMap((p) =>
      input.depths.map((d) => ({ trialId, eventId: event.id, plotId: p.id, topCm: d.topCm, bottomCm: d.bottomCm, code: sampleCode(eventNumber, p.plotNumber, d) })),
    );
    await t.insert(schema.samples).values(samples);
    await recordAudit(
      {
        programId: trial.programId,
        trialId,
        actorId,
        action: "create",
        entity: "sampling_event",
        entityId: event.id,
        details: { season: input.seasonLabel, eventDate: input.eventDate, baseline: input.isBaseline, depths: input.depths, variables: input.variables, samples: samples.length },
      },
      t,
    );
    return { eventId: event.id, eventCode: `E${eventNumber}`, sampleCount: samples.length };
  };
  return tx ? run(tx) : db.transaction(run);
}

export async function plotCount(trialId: string): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(schema.plots).where(eq(schema.plots.trialId, trialId));
  return n;
}
