// Derived soil values per sample, from the stored raw inputs. The one place results pages,
// the data table and exports read measured data from: nothing derived is ever stored.
import { and, asc, eq } from "drizzle-orm";
import { fineEarthMassMgPerHa, socStockMgPerHa } from "../../../analysis/soil";
import { db, schema } from "../db";
import { deriveBd, deriveCustom, deriveLoi, type Inputs } from "./compute";
import { carbonMethodOf } from "./context";
import { currentMeasurement, eventCodeOf } from "./events";

/** One current (not superseded) measurement behind a derived row. */
export interface SampleMeasurement {
  measurementId: string;
  kind: string;
  inputs: Inputs;
  status: "ok" | "excluded";
  statusReason: string | null;
  /** Upload it came from; null for manual entries and corrections. */
  uploadId: string | null;
  /** The derived values even when excluded, for showing beside the mark; null when underivable. */
  asMeasured: Record<string, number | null> | null;
  /** Why the inputs give no value (a stored row the formulas now refuse), else null. */
  problem: string | null;
}

/**
 * One sample (plot × depth increment × sampling event) with its derived values. Every value is
 * null when missing, underivable, or excluded in QC; `excluded` says an input was excluded, and
 * `measurements` carry the as-measured numbers so pages can show them struck through.
 *
 * Units: loi, som, soc, moisture in %; bd, bd_fine in g/cm³; soc_stock and soc_stock_cumulative in
 * Mg C/ha; fine_earth_mass and fine_earth_mass_cumulative in Mg/ha (cumulative from 0 cm in the
 * same plot and event; null below an increment with a missing SOC or BD_fine).
 */
export interface DerivedSample {
  sampleId: string;
  sampleCode: string;
  eventId: string;
  /** "E3": the event's short name from its codes. */
  eventCode: string;
  eventDate: string;
  seasonId: string;
  season: string;
  seasonOrdinal: number;
  isBaseline: boolean;
  plotId: string;
  plotNumber: number;
  block: number;
  treatmentCode: string;
  treatmentName: string;
  isCheck: boolean;
  topCm: number;
  bottomCm: number;
  loi: number | null;
  som: number | null;
  soc: number | null;
  bd: number | null;
  bd_fine: number | null;
  moisture: number | null;
  soc_stock: number | null;
  soc_stock_cumulative: number | null;
  fine_earth_mass: number | null;
  fine_earth_mass_cumulative: number | null;
  /** Program-registered variables by id. */
  custom: Record<string, number | null>;
  excluded: boolean;
  measurements: SampleMeasurement[];
}

export interface DerivedSampleFilter {
  eventId?: string;
  /** Only samples with at least one current measurement. */
  measuredOnly?: boolean;
}

/**
 * Derived values for a trial's samples, ordered by event date, plot number and depth. SOM uses the
 * trial's lab-method calibration (identity by default) and SOC its factor (1.724 default, 2.0
 * selectable); BD_fine subtracts coarse fragments (Poeplau et al. 2017); stocks are SOC % × BD_fine
 * × thickness (DESIGN.md), summed per core from the surface (Ellert & Bettany 1995 cumulative mass coordinates).
 */
export async function loadDerivedSamples(trialId: string, filter: DerivedSampleFilter = {}): Promise<DerivedSample[]> {
  const method = await carbonMethodOf(trialId);
  const customRows = await db
    .select({ variableId: schema.customVariables.variableId, label: schema.customVariables.label, unit: schema.customVariables.unit, minValue: schema.customVariables.minValue, maxValue: schema.customVariables.maxValue })
    .from(schema.customVariables)
    .innerJoin(schema.trials, eq(schema.trials.programId, schema.customVariables.programId))
    .where(eq(schema.trials.id, trialId));
  const customDefs = new Map(customRows.map((c) => [c.variableId, c]));

  const where = [eq(schema.samples.trialId, trialId)];
  if (filter.eventId) where.push(eq(schema.samples.eventId, filter.eventId));
  const samples = await db
    .select({
      sampleId: schema.samples.id,
      sampleCode: schema.samples.code,
      eventId: schema.samples.eventId,
      eventDate: schema.samplingEvents.eventDate,
      isBaseline: schema.samplingEvents.isBaseline,
      seasonId: schema.seasons.id,
      season: schema.seasons.label,
      seasonOrdinal: schema.seasons.ordinal,
      plotId: schema.plots.id,
      plotNumber: schema.plots.plotNumber,
      block: schema.blocks.number,
      treatmentCode: schema.treatments.code,
      treatmentName: schema.treatments.name,
      isCheck: schema.treatments.isCheck,
      topCm: schema.samples.topCm,
      bottomCm: schema.samples.bottomCm,
    })
    .from(schema.samples)
    .innerJoin(schema.samplingEvents, eq(schema.samplingEvents.id, schema.samples.eventId))
    .innerJoin(schema.seasons, eq(schema.seasons.id, schema.samplingEvents.seasonId))
    .innerJoin(schema.plots, eq(schema.plots.id, schema.samples.plotId))
    .innerJoin(schema.blocks, eq(schema.blocks.id, schema.plots.blockId))
    .innerJoin(schema.treatments, eq(schema.treatments.id, schema.plots.treatmentId))
    .where(and(...where))
    .orderBy(asc(schema.samplingEvents.eventDate), asc(schema.plots.plotNumber), asc(schema.samples.topCm));
  if (samples.length === 0) return [];

  const measurementRows = await db
    .select({
      measurementId: schema.measurements.id,
      sampleId: schema.measurements.sampleId,
      kind: schema.measurements.kind,
      inputs: schema.measurements.inputs,
      status: schema.measurements.status,
      statusReason: schema.measurements.statusReason,
      uploadId: schema.measurements.uploadId,
    })
    .from(schema.measurements)
    .innerJoin(schema.samples, eq(schema.samples.id, schema.measurements.sampleId))
    .where(and(...where, currentMeasurement()));
  const bySample = new Map<string, typeof measurementRows>();
  for (const m of measurementRows) bySample.set(m.sampleId, [...(bySample.get(m.sampleId) ?? []), m]);

  const rows: DerivedSample[] = [];
  for (const s of samples) {
    const row: DerivedSample = {
      ...s,
      eventCode: eventCodeOf(s.sampleCode),
      loi: null,
      som: null,
      soc: null,
      bd: null,
      bd_fine: null,
      moisture: null,
      soc_stock: null,
      soc_stock_cumulative: null,
      fine_earth_mass: null,
      fine_earth_mass_cumulative: null,
      custom: {},
      excluded: false,
      measurements: [],
    };
    for (const m of bySample.get(s.sampleId) ?? []) {
      const custom = customDefs.get(m.kind);
      const result =
        m.kind === "loi" ? deriveLoi(m.inputs, method) : m.kind === "bd" ? deriveBd(m.inputs) : custom ? deriveCustom(m.inputs, custom) : null;
      if (!result) continue;
      const asMeasured = result.ok ? (result.values as unknown as Record<string, number | null>) : null;
      row.measurements.push({
        measurementId: m.measurementId,
        kind: m.kind,
        inputs: m.inputs,
        status: m.status,
        statusReason: m.statusReason,
        uploadId: m.uploadId,
        asMeasured,
        problem: result.ok ? null : result.error.message,
      });
      if (m.status === "excluded") {
        row.excluded = true;
        continue;
      }
      if (!asMeasured) continue;
      if (m.kind === "loi") Object.assign(row, { loi: asMeasured.loi, som: asMeasured.som, soc: asMeasured.soc });
      else if (m.kind === "bd") Object.assign(row, { bd: asMeasured.bd, bd_fine: asMeasured.bd_fine, moisture: asMeasured.moisture });
      else row.custom[m.kind] = asMeasured.value;
    }
    if (filter.measuredOnly && row.measurements.length === 0) continue;
    rows.push(row);
  }
  addStocks(rows);
  return rows;
}

/**
 * Per-increment stock and fine-earth mass, and their running sums from 0 cm per core (plot × event).
 * A running sum stops at the first increment that lacks its inputs or leaves a gap.
 */
function addStocks(rows: DerivedSample[]) {
  const cores = new Map<string, DerivedSample[]>();
  for (const r of rows) cores.set(`${r.eventId}|${r.plotId}`, [...(cores.get(`${r.eventId}|${r.plotId}`) ?? []), r]);
  for (const core of cores.values()) {
    core.sort((a, b) => a.topCm - b.topCm);
    let mass: number | null = 0;
    let carbon: number | null = 0;
    let reached = 0;
    for (const r of core) {
      const thickness = r.bottomCm - r.topCm;
      if (r.bd_fine !== null) r.fine_earth_mass = fineEarthMassMgPerHa(r.bd_fine, thickness);
      if (r.bd_fine !== null && r.soc !== null) r.soc_stock = socStockMgPerHa(r.soc, r.bd_fine, thickness);
      const contiguous = r.topCm === reached;
      mass = contiguous && mass !== null && r.fine_earth_mass !== null ? mass + r.fine_earth_mass : null;
      carbon = contiguous && carbon !== null && r.soc_stock !== null ? carbon + r.soc_stock : null;
      r.fine_earth_mass_cumulative = mass;
      r.soc_stock_cumulative = carbon;
      reached = r.bottomCm;
    }
  }
}
