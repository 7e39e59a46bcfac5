// Invented lab results for the demo trial (all numbers made up): raw LOI weighings and bulk-density
// cores per sample, from a seeded generator so every seed writes the same data. A modest compost
// effect in the topsoil that grows season by season, plot-to-plot and lab noise, one plot missing
// in one season and one LOI outlier.
import { mulberry32, type UniformSource } from "../../analysis/design";

/** Sampling events in date order; the first is the pre-treatment baseline. 2027 dates lie ahead of late 2026: the scenario runs to fall 2027. */
export const demoSamplingEvents = [
  { seasonLabel: "2025 spring", eventDate: "2025-03-25", isBaseline: true },
  { seasonLabel: "2025 fall", eventDate: "2025-10-14", isBaseline: false },
  { seasonLabel: "2026 spring", eventDate: "2026-04-21", isBaseline: false },
  { seasonLabel: "2026 fall", eventDate: "2026-10-13", isBaseline: false },
  { seasonLabel: "2027 spring", eventDate: "2027-04-20", isBaseline: false },
  { seasonLabel: "2027 fall", eventDate: "2027-10-12", isBaseline: false },
] as const;

export const demoDepths = [
  { topCm: 0, bottomCm: 10 },
  { topCm: 10, bottomCm: 20 },
  { topCm: 20, bottomCm: 30 },
];

/** The plot left unsampled in one season (flooded, say): plot number and event index. */
export const demoMissingPlotSeason = { block: 3, treatmentCode: "T4", eventIndex: 3 };
/** The one LOI outlier (a mis-keyed residual weighing): block, treatment, event index, depth top. */
export const demoOutlier = { block: 2, treatmentCode: "T1", eventIndex: 2, topCm: 0 };

/** SOM % gained per season since baseline in 0–10 cm, by treatment (the "true" effects). */
const SOM_GAIN_PER_SEASON: Record<string, number> = { T1: 0, T2: 0.2, T3: 0.12, T4: 0.08, T5: 0.2, T6: 0.14 };
/** Share of the topsoil gain reaching each deeper increment. */
const DEPTH_SHARE = [1, 0.35, 0.1];
const BASE_SOM = [3.2, 2.6, 2.1];
const BASE_BD = [1.32, 1.42, 1.48];
/** 3-inch ring driven 3 inches (DESIGN.md): diameter and height in cm. */
export const DEMO_RING_CM = 7.62;

export interface DemoSample {
  code: string;
  plotNumber: number;
  block: number;
  treatmentCode: string;
  topCm: number;
  bottomCm: number;
}

export interface DemoLoiRow {
  sample_code: string;
  crucible_g: number;
  crucible_dry_soil_g: number;
  crucible_residue_g: number;
  ignition_c: number;
  ignition_hours: number;
  lab_id: string;
  notes: string;
}

export interface DemoBdRow {
  sample_code: string;
  core_diameter_cm: number;
  core_height_cm: number;
  oven_dry_mass_g: number;
  wet_mass_g: number;
  coarse_fragment_mass_g: number;
  notes: string;
}

function normal(random: UniformSource): number {
  // Box–Muller transform (Box & Muller 1958, Ann. Math. Stat. 29:610–611).
  const u = 1 - random();
  const v = random();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

const round = (x: number, digits: number) => Number(x.toFixed(digits));

/**
 * Lab rows for one event's samples. Plot effects are drawn once per plot from `seed` so a plot
 * stays high or low across seasons; sample noise depends on the event too.
 */
export function demoLabRows(samples: readonly DemoSample[], eventIndex: number, seed = 20250325): { loi: DemoLoiRow[]; bd: DemoBdRow[] } {
  const plotEffect = new Map<number, number>();
  const plotRandom = mulberry32(seed);
  for (const p of [...new Set(samples.map((s) => s.plotNumber))].sort((a, b) => a - b)) plotEffect.set(p, normal(plotRandom) * 0.15);
  const random = mulberry32(seed + 7919 * (eventIndex + 1));
  const loi: DemoLoiRow[] = [];
  const bd: DemoBdRow[] = [];
  for (const s of samples) {
    const depth = demoDepths.findIndex((d) => d.topCm === s.topCm);
    const skip = s.block === demoMissingPlotSeason.block && s.treatmentCode === demoMissingPlotSeason.treatmentCode && eventIndex === demoMissingPlotSeason.eventIndex;
    // Draw every number even for the skipped plot, so the other plots' values do not depend on it.
    const gain = SOM_GAIN_PER_SEASON[s.treatmentCode] * eventIndex * DEPTH_SHARE[depth];
    const som = BASE_SOM[depth] + gain + (depth === 0 ? plotEffect.get(s.plotNumber)! : plotEffect.get(s.plotNumber)! / 2) + normal(random) * 0.12;
    const crucible = 18 + random() * 6;
    const dry = 9.5 + random() * 1;
    let residue = dry * (1 - som / 100);
    const outlier = s.block === demoOutlier.block && s.treatmentCode === demoOutlier.treatmentCode && eventIndex === demoOutlier.eventIndex && s.topCm === demoOutlier.topCm;
    if (outlier) residue = dry * (1 - (som + 3.5) / 100);
    const bdTrue = BASE_BD[depth] - (gain / 0.2) * 0.012 + normal(random) * 0.04;
    const ring = Math.PI * (DEMO_RING_CM / 2) ** 2 * DEMO_RING_CM;
    const coarse = random() * 12;
    const ovenDry = bdTrue * ring + coarse;
    const moisture = 0.18 + random() * 0.1 + gain / 20;
    const labNumber = `CH-${eventIndex + 1}${String(loi.length + 1).padStart(3, "0")}`;
    if (skip) continue;
    loi.push({
      sample_code: s.code,
      crucible_g: round(crucible, 3),
      crucible_dry_soil_g: round(crucible + dry, 3),
      crucible_residue_g: round(crucible + residue, 3),
      ignition_c: 550,
      ignition_hours: 4,
      lab_id: labNumber,
      notes: outlier ? "re-weighed residue" : "",
    });
    bd.push({
      sample_code: s.code,
      core_diameter_cm: DEMO_RING_CM,
      core_height_cm: DEMO_RING_CM,
      oven_dry_mass_g: round(ovenDry, 1),
      wet_mass_g: round(ovenDry * (1 + moisture), 1),
      coarse_fragment_mass_g: round(coarse, 1),
      notes: "",
    });
  }
  return { loi, bd };
}
