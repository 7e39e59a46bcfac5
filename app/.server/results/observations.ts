// From derived samples to one value per plot and season for the chosen variable and depth:
// the input of every results analysis and chart. Pure.
import type { PlotObservation } from "../../../analysis/results";
import { esmReferenceMassMgPerHa, socStockEsmMgPerHa, type CoreIncrement } from "../../../analysis/soil";
import type { DerivedSample } from "../intake/derived";

export type DepthChoice = { topCm: number; bottomCm: number; cumulative: boolean };

/** Variables summed down the profile: they can be read over a cumulative depth from the surface. */
export const STOCK_VARIABLES = new Set(["soc_stock", "soc_stock_esm"]);

export function depthLabel(d: DepthChoice): string {
  return `${d.topCm}–${d.bottomCm} cm${d.cumulative ? " (cumulative)" : ""}`;
}

export function parseDepth(text: string): { topCm: number; bottomCm: number } | null {
  const m = /^(\d+(?:\.\d+)?)-(\d+(?:\.\d+)?)$/.exec(text);
  if (!m) return null;
  const topCm = Number(m[1]);
  const bottomCm = Number(m[2]);
  return bottomCm > topCm ? { topCm, bottomCm } : null;
}

/** Depth increments sampled in the trial, and the cumulative spans from the surface. */
export function availableDepths(samples: readonly DerivedSample[]) {
  const increments = [...new Map(samples.map((s) => [`${s.topCm}-${s.bottomCm}`, { topCm: s.topCm, bottomCm: s.bottomCm }])).values()].sort(
    (a, b) => a.topCm - b.topCm || a.bottomCm - b.bottomCm,
  );
  // Spans from the surface down to each increment's bottom, beyond the first increment.
  const fromSurface = increments.some((i) => i.topCm === 0);
  const cumulative = fromSurface
    ? increments.filter((d) => d.topCm > 0).map((d) => ({ topCm: 0, bottomCm: d.bottomCm }))
    : [];
  return { increments, cumulative };
}

type Core = { samples: DerivedSample[]; key: string };

function coresOf(samples: readonly DerivedSample[]): Core[] {
  const map = new Map<string, DerivedSample[]>();
  for (const s of samples) map.set(`${s.eventId}|${s.plotId}`, [...(map.get(`${s.eventId}|${s.plotId}`) ?? []), s]);
  return [...map].map(([key, list]) => ({ key, samples: list.sort((a, b) => a.topCm - b.topCm) }));
}

function incrementsTo(core: Core, bottomCm: number): CoreIncrement[] | null {
  const within = core.samples.filter((s) => s.bottomCm <= bottomCm);
  if (within.length === 0 || within[0].topCm !== 0 || within.at(-1)!.bottomCm !== bottomCm) return null;
  const out: CoreIncrement[] = [];
  for (const s of within) {
    if (s.bd_fine === null || s.soc === null) return null;
    out.push({ topCm: s.topCm, bottomCm: s.bottomCm, bdFineGPerCm3: s.bd_fine, socPercent: s.soc });
  }
  return out;
}

/**
 * The equivalent-soil-mass reference for a depth span: the stored one, else the DESIGN.md default —
 * the smallest deepest-cumulative fine-earth mass over every complete core of every season.
 */
export function defaultReferenceMass(samples: readonly DerivedSample[], bottomCm: number): number | null {
  const cores = coresOf(samples)
    .map((c) => incrementsTo(c, bottomCm))
    .filter((c): c is CoreIncrement[] => c !== null);
  return cores.length === 0 ? null : esmReferenceMassMgPerHa(cores);
}

function valueOf(sample: DerivedSample, variable: string): number | null {
  switch (variable) {
    case "loi":
    case "som":
    case "soc":
    case "bd":
    case "bd_fine":
    case "moisture":
    case "soc_stock":
      return sample[variable];
    default:
      return sample.custom[variable] ?? null;
  }
}

/**
 * One observation per plot and season. With several events in a season the latest is used.
 * Stocks over a cumulative depth sum the increments from 0 cm; ESM stocks interpolate each core's
 * cumulative carbon at the reference mass (Ellert & Bettany 1995, linear).
 */
export function plotObservations(
  samples: readonly DerivedSample[],
  variable: string,
  depth: DepthChoice,
  referenceMassMgPerHa: number | null,
): PlotObservation[] {
  const baselineDate = samples.find((s) => s.isBaseline)?.eventDate ?? samples[0]?.eventDate;
  const years = (date: string) => (baselineDate ? (Date.parse(date) - Date.parse(baselineDate)) / (365.25 * 86_400_000) : 0);
  const bySeasonPlot = new Map<string, PlotObservation & { eventDate: string }>();
  for (const core of coresOf(samples)) {
    const first = core.samples[0];
    let value: number | null = null;
    let excluded = false;
    if (variable === "soc_stock_esm" || (variable === "soc_stock" && depth.cumulative)) {
      const increments = incrementsTo(core, depth.bottomCm);
      excluded = core.samples.some((s) => s.bottomCm <= depth.bottomCm && s.excluded);
      if (increments && variable === "soc_stock") {
        value = core.samples.find((s) => s.bottomCm === depth.bottomCm)?.soc_stock_cumulative ?? null;
      } else if (increments && referenceMassMgPerHa !== null) {
        const deepest = increments.reduce((m, i) => m + i.bdFineGPerCm3 * (i.bottomCm - i.topCm) * 100, 0);
        value = deepest + 1e-9 >= referenceMassMgPerHa ? socStockEsmMgPerHa(increments, referenceMassMgPerHa) : null;
      }
    } else {
      const sample = core.samples.find((s) => s.topCm === depth.topCm && s.bottomCm === depth.bottomCm);
      if (!sample) continue;
      value = valueOf(sample, variable);
      excluded = sample.excluded && value === null;
    }
    const key = `${first.seasonId}|${first.plotId}`;
    const existing = bySeasonPlot.get(key);
    if (existing && existing.eventDate > first.eventDate) continue;
    bySeasonPlot.set(key, {
      plotNumber: first.plotNumber,
      block: first.block,
      treatment: first.treatmentCode,
      season: first.season,
      seasonOrder: first.seasonOrdinal,
      isBaseline: first.isBaseline,
      yearsFromBaseline: years(first.eventDate),
      value,
      excluded,
      eventDate: first.eventDate,
    });
  }
  const observations = [...bySeasonPlot.values()].map(({ eventDate: _date, ...o }) => o);
  return [...observations, ...unsampledPlots(observations)].sort((a, b) => a.seasonOrder - b.seasonOrder || a.plotNumber - b.plotNumber);
}

/**
 * A plot measured in other seasons but with no sample in a season is a missing value of that
 * season, not a plot that does not exist: the analyses then estimate it by least squares
 * (DESIGN.md "Missing values") instead of refusing the season as an incomplete layout.
 */
function unsampledPlots(observations: readonly PlotObservation[]): PlotObservation[] {
  const plots = new Map(observations.map((o) => [o.plotNumber, { block: o.block, treatment: o.treatment }]));
  const seasons = new Map(
    observations.map((o) => [o.season, { season: o.season, seasonOrder: o.seasonOrder, isBaseline: o.isBaseline, yearsFromBaseline: o.yearsFromBaseline }]),
  );
  const present = new Set(observations.map((o) => `${o.season}|${o.plotNumber}`));
  return [...seasons.values()].flatMap((season) =>
    [...plots]
      .filter(([plotNumber]) => !present.has(`${season.season}|${plotNumber}`))
      .map(([plotNumber, plot]) => ({ plotNumber, ...plot, ...season, value: null, excluded: false })),
  );
}
