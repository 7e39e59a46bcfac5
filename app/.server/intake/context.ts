// What validation needs to know about a trial, read in one place (optionally inside a transaction).
import { and, asc, eq } from "drizzle-orm";
import type { DepthIncrement } from "../../../analysis/soil";
import { db, schema, type Db, type Tx } from "../db";
import { deriveBd, deriveCustom, deriveLoi, type CarbonMethod, type Inputs } from "./compute";
import { IntakeError } from "./errors";
import { eventCodeOf, currentMeasurement } from "./events";
import { BUILT_IN_KINDS, customKind, type CustomVariableDef, type KindDef } from "./kinds";
import type { CommittedValue, IntakeContext, SampleInfo } from "./validate";

/** The trial's way from LOI to SOM and SOC: its lab method's calibration and SOM-to-SOC factor. */
export async function carbonMethodOf(trialId: string, t: Db | Tx = db): Promise<CarbonMethod> {
  const [row] = await t
    .select({ socFactor: schema.trials.socFactor, slope: schema.labMethods.somSlope, intercept: schema.labMethods.somIntercept })
    .from(schema.trials)
    .leftJoin(schema.labMethods, eq(schema.labMethods.id, schema.trials.labMethodId))
    .where(eq(schema.trials.id, trialId));
  if (!row) throw new IntakeError("No such trial.", undefined, 404);
  const calibration = row.slope !== null && row.intercept !== null && !(row.slope === 1 && row.intercept === 0) ? { slope: row.slope, intercept: row.intercept } : undefined;
  return { socFactor: row.socFactor, calibration };
}

/** Kinds a program can upload: LOI, BD and its registered variables. */
export async function kindsOf(programId: string, t: Db | Tx = db): Promise<{ kinds: KindDef[]; custom: Map<string, CustomVariableDef> }> {
  const rows = await t.select().from(schema.customVariables).where(eq(schema.customVariables.programId, programId)).orderBy(asc(schema.customVariables.label));
  const custom = new Map(rows.map((r) => [r.variableId, { variableId: r.variableId, label: r.label, unit: r.unit, minValue: r.minValue, maxValue: r.maxValue }]));
  return { kinds: [...Object.values(BUILT_IN_KINDS), ...[...custom.values()].map(customKind)], custom };
}

export async function kindOf(programId: string, kindId: string, t: Db | Tx = db): Promise<{ kind: KindDef; custom?: CustomVariableDef }> {
  if (BUILT_IN_KINDS[kindId]) return { kind: BUILT_IN_KINDS[kindId] };
  const { custom } = await kindsOf(programId, t);
  const def = custom.get(kindId);
  if (!def) throw new IntakeError("Choose what the file holds: LOI, bulk density or one of the program's registered variables.", "kind");
  return { kind: customKind(def), custom: def };
}

/** Every sample of the trial with its event, plot, block and treatment, keyed by code. */
export async function trialSamples(trialId: string, t: Db | Tx = db): Promise<Map<string, SampleInfo>> {
  const rows = await t
    .select({
      sampleId: schema.samples.id,
      code: schema.samples.code,
      eventId: schema.samples.eventId,
      season: schema.seasons.label,
      plotNumber: schema.plots.plotNumber,
      block: schema.blocks.number,
      treatment: schema.treatments.code,
      topCm: schema.samples.topCm,
      bottomCm: schema.samples.bottomCm,
    })
    .from(schema.samples)
    .innerJoin(schema.samplingEvents, eq(schema.samplingEvents.id, schema.samples.eventId))
    .innerJoin(schema.seasons, eq(schema.seasons.id, schema.samplingEvents.seasonId))
    .innerJoin(schema.plots, eq(schema.plots.id, schema.samples.plotId))
    .innerJoin(schema.blocks, eq(schema.blocks.id, schema.plots.blockId))
    .innerJoin(schema.treatments, eq(schema.treatments.id, schema.plots.treatmentId))
    .where(eq(schema.samples.trialId, trialId));
  return new Map(
    rows.map((r) => [
      r.code.toUpperCase(),
      { ...r, block: String(r.block), eventLabel: `${r.season} (${eventCodeOf(r.code)})` },
    ]),
  );
}

/** The number the outlier check compares for one stored measurement. */
export function outlierValueOf(kind: KindDef, inputs: Inputs, method: CarbonMethod, custom?: CustomVariableDef): number | null {
  const result =
    kind.id === "loi" ? deriveLoi(inputs, method) : kind.id === "bd" ? deriveBd(inputs) : deriveCustom(inputs, { ...custom!, label: custom!.label });
  if (!result.ok) return null;
  const value = (result.values as unknown as Record<string, number | null>)[kind.outlierVariable];
  return typeof value === "number" ? value : null;
}

/** Builds the validation context for one kind of result in one trial. */
export async function intakeContext(trialId: string, programId: string, kindId: string, t: Db | Tx = db): Promise<IntakeContext> {
  const { kind, custom } = await kindOf(programId, kindId, t);
  const method = await carbonMethodOf(trialId, t);
  const samples = await trialSamples(trialId, t);
  const events = await t
    .select({ id: schema.samplingEvents.id, depths: schema.samplingEvents.depths })
    .from(schema.samplingEvents)
    .where(eq(schema.samplingEvents.trialId, trialId));
  const eventDepths = new Map<string, DepthIncrement[]>(events.map((e) => [e.id, e.depths]));
  const stored = await t
    .select({
      id: schema.measurements.id,
      sampleId: schema.measurements.sampleId,
      inputs: schema.measurements.inputs,
      status: schema.measurements.status,
      filename: schema.uploads.filename,
      createdAt: schema.measurements.createdAt,
    })
    .from(schema.measurements)
    .innerJoin(schema.samples, eq(schema.samples.id, schema.measurements.sampleId))
    .leftJoin(schema.uploads, eq(schema.uploads.id, schema.measurements.uploadId))
    .where(and(eq(schema.samples.trialId, trialId), eq(schema.measurements.kind, kind.id), currentMeasurement()));
  const committed = new Map<string, CommittedValue>();
  for (const m of stored) {
    committed.set(m.sampleId, {
      measurementId: m.id,
      value: m.status === "excluded" ? null : outlierValueOf(kind, m.inputs, method, custom),
      source: m.filename ? `“${m.filename}”` : `an entry of ${m.createdAt.toISOString().slice(0, 10)}`,
    });
  }
  return { kind, custom, method, samples, eventDepths, committed };
}
