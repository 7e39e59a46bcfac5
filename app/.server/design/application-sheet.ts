// The application sheet: per plot, what each amendment application puts on it.
import { asIsKgPerPlot, elementAppliedKgPerHa } from "../../../analysis/amendments";
import { inUnitSystem, type SiUnit, type UnitSystem } from "../../../analysis/units";
import { timingText } from "~/design/cautions";
import { plotMapData } from "./layout";
import { listTreatments } from "./treatments";
import type { CsvCell } from "../csv";
import { rounded } from "../csv";

export type SheetItem = {
  amendment: string;
  material: string;
  batch: string;
  timing: string;
  rate: number | null;
  asIsPerPlot: number | null;
  dryPerPlot: number | null;
  layerDepth: number | null;
  volumePerPlot: number | null;
  carbon: number | null;
  nitrogen: number | null;
  /** Why an amount could not be worked out, in words. */
  note: string | null;
};

export type ApplicationSheet = {
  title: string;
  status: string;
  unitSystem: UnitSystem;
  units: Record<"rate" | "mass" | "area" | "depth" | "volume" | "perArea", string>;
  plotArea: number;
  rows: { plotNumber: number; block: number; treatmentCode: string; treatmentName: string; isCheck: boolean; items: SheetItem[] }[];
  totals: { amendment: string; batch: string; asIs: number | null; volume: number | null; plots: number }[];
};

/** The reader's unit system, or the one asked for with ?units=si|us. */
export function unitsFor(request: Request, preference: UnitSystem): UnitSystem {
  const asked = new URL(request.url).searchParams.get("units");
  return asked === "si" || asked === "us" ? asked : preference;
}

function convert(value: number | null, unit: SiUnit, system: UnitSystem): number | null {
  return value === null ? null : inUnitSystem(value, unit, system).value;
}

/** Per-plot application amounts in the reader's unit system, or null when the trial has no plots yet. */
export async function applicationSheet(trialId: string, unitSystem: UnitSystem): Promise<ApplicationSheet | null> {
  const map = await plotMapData(trialId, unitSystem);
  if (!map || map.plots.length === 0) return null;
  const areaM2 = map.trial.plotLengthM * map.trial.plotWidthM;
  const treatments = await listTreatments(trialId);
  const itemsOf = new Map(
    treatments.map((t) => [
      t.code,
      t.applications.map((a): SheetItem => {
        const rate = a.rateMgDmPerHa;
        const notes: string[] = [];
        let asIs: number | null = null;
        if (rate !== null) {
          if (a.moistureWetBasisPct === null) notes.push("batch has no moisture on record, so the as-is mass is unknown");
          else asIs = asIsKgPerPlot(rate, areaM2, a.moistureWetBasisPct);
        }
        const carbon = rate !== null && a.totalCarbonDryPct !== null ? elementAppliedKgPerHa(rate, a.totalCarbonDryPct) : null;
        const nitrogen = rate !== null && a.totalNitrogenDryPct !== null ? elementAppliedKgPerHa(rate, a.totalNitrogenDryPct) : null;
        if (rate !== null && (a.totalCarbonDryPct === null || a.totalNitrogenDryPct === null)) notes.push("batch lacks a C or N analysis");
        const volumeM3 = a.layerDepthCm !== null ? (areaM2 * a.layerDepthCm) / 100 : null;
        if (rate === null && a.layerDepthCm === null) notes.push("no rate or layer: apply as the treatment describes");
        return {
          amendment: a.amendmentName ?? "—",
          material: a.material ?? "other",
          batch: a.batchLabel ?? "—",
          timing: timingText(a.timing, a.everyNWeeks),
          rate: convert(rate, "mg_per_ha", unitSystem),
          asIsPerPlot: convert(asIs, "kg", unitSystem),
          dryPerPlot: convert(rate !== null ? (rate * 1000 * areaM2) / 10_000 : null, "kg", unitSystem),
          layerDepth: convert(a.layerDepthCm, "cm", unitSystem),
          volumePerPlot: convert(volumeM3, "m3", unitSystem),
          carbon: convert(carbon, "kg_per_ha", unitSystem),
          nitrogen: convert(nitrogen, "kg_per_ha", unitSystem),
          note: notes.length ? notes.join("; ") : null,
        };
      }),
    ]),
  );
  const treatmentByCode = new Map(map.treatments.map((t) => [t.code, t]));
  const rows = map.plots.map((p) => {
    const t = treatmentByCode.get(p.treatment)!;
    return { plotNumber: p.plotNumber, block: p.block, treatmentCode: t.code, treatmentName: t.name, isCheck: t.isCheck, items: itemsOf.get(t.code) ?? [] };
  });
  const totals = new Map<string, ApplicationSheet["totals"][number]>();
  for (const row of rows) {
    for (const item of row.items) {
      const key = `${item.amendment}\u0000${item.batch}`;
      const total = totals.get(key) ?? { amendment: item.amendment, batch: item.batch, asIs: null, volume: null, plots: 0 };
      total.plots += 1;
      if (item.asIsPerPlot !== null) total.asIs = (total.asIs ?? 0) + item.asIsPerPlot;
      if (item.volumePerPlot !== null) total.volume = (total.volume ?? 0) + item.volumePerPlot;
      totals.set(key, total);
    }
  }
  const label = (unit: SiUnit) => inUnitSystem(1, unit, unitSystem).unit;
  return {
    title: map.trial.title,
    status: map.trial.status,
    unitSystem,
    units: { rate: `${label("mg_per_ha")} dry matter`, mass: label("kg"), area: label("m2"), depth: label("cm"), volume: label("m3"), perArea: label("kg_per_ha") },
    plotArea: convert(areaM2, "m2", unitSystem)!,
    rows,
    totals: [...totals.values()],
  };
}

/** The sheet as CSV rows: one row per plot and application (a check plot gets one row saying so). */
export function applicationSheetCsv(sheet: ApplicationSheet): CsvCell[][] {
  const u = sheet.units;
  const header = [
    "Plot",
    "Block",
    "Treatment code",
    "Treatment",
    "Amendment",
    "Batch",
    "Timing",
    `Rate (${u.rate})`,
    `As-is per plot (${u.mass})`,
    `Dry matter per plot (${u.mass})`,
    `Layer depth (${u.depth})`,
    `Volume per plot (${u.volume})`,
    `C applied (${u.perArea})`,
    `N applied (${u.perArea})`,
    "Note",
  ];
  const out: CsvCell[][] = [header];
  for (const row of sheet.rows) {
    const base = [row.plotNumber, row.block, row.treatmentCode, row.treatmentName];
    if (row.items.length === 0) {
      out.push([...base, row.isCheck ? "none (untreated check)" : "none", null, null, null, null, null, null, null, null, null, null]);
      continue;
    }
    for (const i of row.items) {
      out.push([
        ...base,
        i.amendment,
        i.batch,
        i.timing,
        rounded(i.rate, 3),
        rounded(i.asIsPerPlot, 2),
        rounded(i.dryPerPlot, 2),
        rounded(i.layerDepth, 2),
        rounded(i.volumePerPlot, 3),
        rounded(i.carbon, 1),
        rounded(i.nitrogen, 1),
        i.note,
      ]);
    }
  }
  return out;
}
