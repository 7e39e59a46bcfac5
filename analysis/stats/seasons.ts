import { linearRegression } from "simple-statistics";
import { anovaRows, missingValues, observedMean, rowOf, singleStratumMeans, type AnovaResult } from "./anova-table";
import { rcbdAnova, splitPlotAnova, type AnalysisOptions, type BlockedPlot } from "./designs";
import { fUpperTailP } from "./distributions";
import { cellIndices, fitLinearModel } from "./linear-model";
import { crossedTerm, type ModelData } from "./model-data";
import {
  checkLevelCount,
  checkObservedLevels,
  checkValues,
  levelsOf,
  toModelData,
  type LeveledPlot,
  type PlotValue,
} from "./plot-records";

/** One plot of an RCBD in one season. */
export interface SeasonPlot {
  block: string;
  treatment: string;
  season: string;
  value: PlotValue;
}

/** How the plots of an across-season analysis are laid out. */
export interface SeasonLayout {
  /** Block factor (RCBD); whole plots are block × treatment combinations. */
  block?: string;
  /** Without blocks (completely randomized): the factor naming each plot. */
  plot?: string;
  /** Treatment factor(s): one for a single-factor trial, 2 or 3 for a factorial. */
  treatments: string[];
  /** The season factor. */
  season: string;
}

/** A whole plot in a season with no value (or no row): its levels, season included. */
export type MissingPlotSeason = Record<string, string>;

/** Thrown by the across-season analysis when plot-seasons are missing; names every one. */
export class MissingPlotSeasonsError extends Error {
  readonly missing: MissingPlotSeason[];
  constructor(missing: MissingPlotSeason[], layout: SeasonLayout) {
    const names = [layout.block ?? layout.plot!, ...layout.treatments];
    const shown = 10;
    const listed = missing
      .slice(0, shown)
      .map((m) => `${names.map((n) => `${n} ${m[n]}`).join(", ")} in ${m[layout.season]}`)
      .join("; ");
    const more = missing.length > shown ? ` and ${missing.length - shown} more` : "";
    super(
      `the split-plot in time needs every plot in every season; ${missing.length} missing: ${listed}${more}. ` +
        "Analyse each season on its own instead (a mixed model for incomplete seasons is later work).",
    );
    this.name = "MissingPlotSeasonsError";
    this.missing = missing;
  }
}

function unitOf(layout: SeasonLayout): string {
  if ((layout.block === undefined) === (layout.plot === undefined)) {
    throw new Error("an analysis across seasons needs either a block factor or, without blocks, a plot factor");
  }
  return (layout.block ?? layout.plot)!;
}

/** Key of a plot's whole plot: block and treatments in an RCBD, the plot name otherwise. */
function wholePlotNames(layout: SeasonLayout): string[] {
  return layout.block ? [layout.block, ...layout.treatments] : [unitOf(layout), ...layout.treatments];
}

/**
 * Whether every whole plot has a value in every season — the usual case, settled on level codes
 * before `missingPlotSeasons` builds any list: the distinct observed (whole plot, season) cells
 * must number whole plots × seasons. In an RCBD every block × treatment combination is a whole
 * plot, with a row or not.
 */
function everyPlotSeasonObserved(data: ModelData, layout: SeasonLayout): boolean {
  const names = wholePlotNames(layout);
  const wholePlot = cellIndices(data, names);
  const cell = cellIndices(data, [...names, layout.season]);
  const wholePlots = new Set<number>();
  const observed = new Set<number>();
  for (let obs = 0; obs < data.y.length; obs++) {
    wholePlots.add(wholePlot.index[obs]);
    if (Number.isFinite(data.y[obs])) observed.add(cell.index[obs]);
  }
  let wholePlotCount = wholePlots.size;
  if (layout.block) {
    // The block is the slowest digit of a whole plot's index: the rest numbers its treatment combination.
    const combinationCells = wholePlot.cells / data.factors[layout.block].levels.length;
    const combinations = new Set([...wholePlots].map((index) => index % combinationCells));
    wholePlotCount = data.factors[layout.block].levels.length * combinations.size;
  }
  return observed.size === wholePlotCount * data.factors[layout.season].levels.length;
}

/** Every whole plot × season without a value, whole plots in order of first appearance. */
export function missingPlotSeasons(plots: readonly LeveledPlot[], layout: SeasonLayout): MissingPlotSeason[] {
  const names = wholePlotNames(layout);
  if (everyPlotSeasonObserved(toModelData(plots, [...names, layout.season]), layout)) return [];
  const keys = new Map(plots.map((p) => [p, JSON.stringify(names.map((n) => p.levels[n]))]));
  const key = (p: LeveledPlot) => keys.get(p)!;
  const present = new Set(plots.filter((p) => p.value !== null).map((p) => `${key(p)}|${p.levels[layout.season]}`));
  const wholePlots = new Map<string, Record<string, string>>();
  for (const p of plots) if (!wholePlots.has(key(p))) wholePlots.set(key(p), Object.fromEntries(names.map((n) => [n, p.levels[n]])));
  if (layout.block) {
    // In an RCBD a block × treatment with no row at all is a whole plot too.
    const blocks = levelsOf(plots, layout.block);
    const combos = [...new Set(plots.map((p) => JSON.stringify(layout.treatments.map((f) => p.levels[f]))))].map((c) => JSON.parse(c) as string[]);
    for (const block of blocks) {
      for (const combo of combos) {
        const levels = Object.fromEntries([[layout.block, block], ...layout.treatments.map((f, k) => [f, combo[k]])]);
        const k = JSON.stringify(names.map((n) => levels[n]));
        if (!wholePlots.has(k)) wholePlots.set(k, levels);
      }
    }
  }
  const seasons = levelsOf(plots, layout.season);
  const out: MissingPlotSeason[] = [];
  for (const [k, levels] of wholePlots) {
    for (const season of seasons) if (!present.has(`${k}|${season}`)) out.push({ ...levels, [layout.season]: season });
  }
  return out;
}

/**
 * Greenhouse–Geisser ε from the k × k covariance matrix S of the repeated measures:
 * with A = PSP, P = I − J/k the centring matrix (equivalently C S C' for orthonormal contrasts C),
 * ε = (tr A)² / ((k − 1)·tr A²); 1/(k − 1) ≤ ε ≤ 1, ε = 1 under sphericity
 * (Box 1954, Ann. Math. Stat. 25:290–302; Greenhouse & Geisser 1959, Psychometrika 24:95–112).
 */
export function greenhouseGeisserEpsilon(covariance: readonly (readonly number[])[]): number {
  const k = covariance.length;
  if (k < 2) throw new Error("sphericity needs at least two repeated measures");
  const rowMeans = covariance.map((row) => row.reduce((s, v) => s + v, 0) / k);
  const colMeans = covariance[0].map((_, j) => covariance.reduce((s, row) => s + row[j], 0) / k);
  const grand = rowMeans.reduce((s, v) => s + v, 0) / k;
  const a = covariance.map((row, i) => row.map((v, j) => v - rowMeans[i] - colMeans[j] + grand));
  const trace = a.reduce((s, row, i) => s + row[i], 0);
  const traceSquared = a.reduce((s, row) => s + row.reduce((t, v) => t + v * v, 0), 0);
  return (trace * trace) / ((k - 1) * traceSquared);
}

/**
 * Pooled covariance of the season values between whole plots after removing, season by season,
 * the whole-plot effects (block and treatment in an RCBD, treatment when completely randomized) —
 * the error SSCP of the multivariate whole-plot analysis over its df. Needs complete data.
 */
export function withinPlotSeasonCovariance(plots: readonly LeveledPlot[], layout: SeasonLayout): number[][] {
  return seasonCovariance(toModelData(plots, [...wholePlotNames(layout), layout.season]), layout);
}

/**
 * `withinPlotSeasonCovariance` on coded data, such as the split-plot fit holds: per season, the
 * residual y − ȳ_treatment − (ȳ_block − ȳ) of each whole plot (no block term when completely
 * randomized), then S_ij = Σ_plots r_i·r_j / (whole plots − treatments − (blocks − 1)). Whole
 * plots are summed in order of first appearance, season by season. Integer indices and flat
 * arrays, because this runs on every row of a many-season trial.
 */
function seasonCovariance(data: ModelData, layout: SeasonLayout): number[][] {
  const n = data.y.length;
  const season = data.factors[layout.season];
  const seasonCount = season.levels.length;
  const block = layout.block ? data.factors[layout.block] : null;
  const blockCount = block ? block.levels.length : 0;
  const treatment = cellIndices(data, layout.treatments);
  const wholePlot = cellIndices(data, wholePlotNames(layout));
  // Observations of each season, in data order.
  const bySeason = Array.from({ length: seasonCount }, () => [] as number[]);
  for (let obs = 0; obs < n; obs++) bySeason[season.codes[obs]].push(obs);
  // Whole plots numbered in order of first appearance; residuals[plot·seasons + season].
  const plotNumber = new Map<number, number>();
  const residuals: number[] = [];
  const treatmentSums = new Float64Array(treatment.cells);
  const treatmentCounts = new Float64Array(treatment.cells);
  const blockSums = new Float64Array(blockCount);
  const blockCounts = new Float64Array(blockCount);
  for (let si = 0; si < seasonCount; si++) {
    const inSeason = bySeason[si];
    treatmentSums.fill(0);
    treatmentCounts.fill(0);
    blockSums.fill(0);
    blockCounts.fill(0);
    let total = 0;
    for (const obs of inSeason) {
      const y = data.y[obs];
      total += y;
      treatmentSums[treatment.index[obs]] += y;
      treatmentCounts[treatment.index[obs]] += 1;
      if (block) {
        blockSums[block.codes[obs]] += y;
        blockCounts[block.codes[obs]] += 1;
      }
    }
    const grand = total / inSeason.length;
    for (const obs of inSeason) {
      let plot = plotNumber.get(wholePlot.index[obs]);
      if (plot === undefined) {
        plot = plotNumber.size;
        plotNumber.set(wholePlot.index[obs], plot);
        for (let s = 0; s < seasonCount; s++) residuals.push(0);
      }
      const t = treatment.index[obs];
      const blockEffect = block ? blockSums[block.codes[obs]] / blockCounts[block.codes[obs]] - grand : 0;
      residuals[plot * seasonCount + si] = data.y[obs] - treatmentSums[t] / treatmentCounts[t] - blockEffect;
    }
  }
  const treatmentCount = new Set(treatment.index).size;
  const df = plotNumber.size - treatmentCount - (block ? blockCount - 1 : 0);
  // Symmetric: each S_ij with j ≥ i is summed once and mirrored (r_i·r_j and r_j·r_i are the same double).
  const covariance = Array.from({ length: seasonCount }, () => new Array<number>(seasonCount));
  for (let i = 0; i < seasonCount; i++) {
    for (let j = i; j < seasonCount; j++) {
      let sum = 0;
      for (let plot = 0; plot < plotNumber.size; plot++) sum += residuals[plot * seasonCount + i] * residuals[plot * seasonCount + j];
      covariance[i][j] = sum / df;
      covariance[j][i] = sum / df;
    }
  }
  return covariance;
}

export interface SphericityCorrection {
  epsilon: number;
  /** Season-stratum F tests with both df multiplied by ε. */
  adjusted: { source: string; df1: number; df2: number; p: number }[];
  assumption: string;
}

export interface SeasonsAnalysis extends AnovaResult {
  sphericity: SphericityCorrection;
}

/**
 * Split-plot in time (Steel & Torrie 1980, §16.7; Gomez & Gomez 1984, §6.2): the whole-plot
 * stratum — block, treatment terms, error(a) = block:treatment (or plot within treatment when
 * completely randomized) — then season and its interactions with the treatment terms against
 * error(b) = residual, with Greenhouse–Geisser ε applied to the season-stratum F tests.
 * Throws `MissingPlotSeasonsError` naming the missing plot-seasons when the data are incomplete.
 */
export function seasonsAnalysis(plots: readonly LeveledPlot[], layout: SeasonLayout, options: AnalysisOptions = {}): SeasonsAnalysis {
  const unit = unitOf(layout);
  checkValues(plots, [unit, ...layout.treatments, layout.season]);
  const missing = missingPlotSeasons(plots, layout);
  if (missing.length > 0) throw new MissingPlotSeasonsError(missing, layout);
  checkLevelCount(plots, layout.season, 2, "an analysis across seasons");
  const result = splitPlotAnova(plots, {
    block: layout.block,
    plot: layout.plot,
    main: layout.treatments,
    sub: [layout.season],
    method: options.method,
  });
  const epsilon = greenhouseGeisserEpsilon(seasonCovariance(result.fit.data, layout));
  const residual = rowOf(result.table, "residual");
  const adjusted = result.table
    .filter((r) => r.errorTerm === "residual" && r.f !== null)
    .map((r) => ({
      source: r.source,
      df1: r.df * epsilon,
      df2: residual.df * epsilon,
      p: fUpperTailP(r.f!, r.df * epsilon, residual.df * epsilon),
    }));
  return {
    ...result,
    sphericity: {
      epsilon,
      adjusted,
      assumption:
        "the season-stratum F tests assume sphericity (equal variances of all season-to-season differences); " +
        "Greenhouse–Geisser ε < 1 measures the departure and its p-values correct for it",
    },
  };
}

/** Split-plot in time for an RCBD with one treatment factor (see `seasonsAnalysis`). */
export function splitPlotInTime(plots: readonly SeasonPlot[], options: AnalysisOptions = {}): SeasonsAnalysis {
  const leveled = plots.map((p) => ({ levels: { block: p.block, treatment: p.treatment, season: p.season }, value: p.value }));
  return seasonsAnalysis(leveled, { block: "block", treatments: ["treatment"], season: "season" }, options);
}

/** One RCBD per season (missing plots handled within each season), keyed by season. */
export function perSeasonAnalyses(plots: readonly SeasonPlot[], options: AnalysisOptions = {}): Record<string, AnovaResult> {
  const seasons = [...new Set(plots.map((p) => p.season))];
  return Object.fromEntries(
    seasons.map((season) => [
      season,
      rcbdAnova(
        plots.filter((p) => p.season === season).map(({ block, treatment, value }) => ({ block, treatment, value })),
        options,
      ),
    ]),
  );
}

/** A plot with its pre-treatment baseline and a later value. */
export interface BaselinePlot {
  block?: string;
  treatment: string;
  baseline: number;
  value: PlotValue;
}

export interface BaselineAncova extends AnovaResult {
  /** Common within-treatment slope of change on baseline. */
  slope: { estimate: number; se: number };
  /** Mean baseline, at which the adjusted means are given. */
  baselineMean: number;
}

/**
 * Change-from-baseline ANCOVA: (value − baseline) = μ + [block] + τ_i + β(baseline − mean) + ε,
 * each term adjusted for the others (type II); treatment means are adjusted to the mean baseline
 * (Montgomery, DAE, §15.3; Senn 2006, Stat. Med. 25:4334–4344). With the baseline as covariate,
 * analysing the change or the final value gives the same treatment test.
 */
export function baselineAncova(plots: readonly BaselinePlot[]): BaselineAncova {
  const blocked = plots.some((p) => p.block !== undefined);
  const names = blocked ? ["block", "treatment"] : ["treatment"];
  const leveled: LeveledPlot[] = plots.map((p) => ({
    levels: blocked ? { block: p.block ?? "", treatment: p.treatment } : ({ treatment: p.treatment } as Record<string, string>),
    value: p.value === null ? null : p.value - p.baseline,
  }));
  plots.forEach((p) => {
    if (!Number.isFinite(p.baseline)) {
      throw new Error(`${p.block !== undefined ? `block ${p.block}, ` : ""}treatment ${p.treatment}: the baseline is not a number`);
    }
  });
  checkValues(leveled, names);
  checkLevelCount(leveled, "treatment", 2, "a baseline ANCOVA");
  checkObservedLevels(leveled, "treatment");
  const data = toModelData(leveled, names, { baseline: plots.map((p) => p.baseline) });
  const terms = [...(blocked ? [crossedTerm("block")] : []), crossedTerm("treatment"), crossedTerm("baseline")];
  const fit = fitLinearModel(data, terms, "least-squares");
  if (fit.residual.df <= 0) throw new Error("there are no degrees of freedom left for error after fitting the baseline");
  const table = anovaRows(fit);
  const residual = rowOf(table, "residual");
  const { design, fit: ls } = fit.leastSquares!;
  const slopeColumn = design.columns.baseline.start;
  const grandMean = observedMean(fit);
  const observedBaselines = fit.observed.map((i) => plots[i].baseline);
  return {
    design: "ancova",
    n: fit.observed.length,
    missing: missingValues(fit, names),
    table,
    grandMean,
    cvPercent: (Math.sqrt(residual.ms ?? Number.NaN) / grandMean) * 100,
    means: { treatment: singleStratumMeans(fit, "treatment", ["treatment"], residual) },
    method: fit.method,
    fit,
    slope: {
      estimate: ls.coefficients[slopeColumn],
      se: Math.sqrt((residual.ms ?? Number.NaN) * ls.unscaledCovariance[slopeColumn][slopeColumn]),
    },
    baselineMean: observedBaselines.reduce((s, v) => s + v, 0) / observedBaselines.length,
  };
}

/** A plot's value at a time, in years from the first sampling. */
export interface TimedPlot {
  block: string;
  treatment: string;
  timeYears: number;
  value: PlotValue;
}

export interface PlotSlope {
  block: string;
  treatment: string;
  /** Least-squares slope, units per year; null when the plot has fewer than two times with values. */
  slopePerYear: number | null;
  points: number;
}

/** Least-squares slope of value on time for each plot, b = Σ(t − t̄)(y − ȳ)/Σ(t − t̄)². */
export function plotSlopes(plots: readonly TimedPlot[]): PlotSlope[] {
  const byPlot = new Map<string, TimedPlot[]>();
  for (const p of plots) {
    if (!Number.isFinite(p.timeYears)) throw new Error(`block ${p.block}, treatment ${p.treatment}: a sampling time is not a number`);
    const key = JSON.stringify([p.block, p.treatment]);
    byPlot.set(key, [...(byPlot.get(key) ?? []), p]);
  }
  return [...byPlot.values()].map((series) => {
    const used = series.filter((p) => p.value !== null);
    const distinctTimes = new Set(used.map((p) => p.timeYears)).size;
    const slope = distinctTimes >= 2 ? linearRegression(used.map((p) => [p.timeYears, p.value as number])).m : null;
    return { block: series[0].block, treatment: series[0].treatment, slopePerYear: slope, points: used.length };
  });
}

export interface RateOfChange {
  slopes: PlotSlope[];
  /** RCBD of the per-plot slopes (units per year). */
  anova: AnovaResult;
}

/**
 * Rate of change: fit one least-squares slope per plot (units per year), then analyse the slopes
 * as an RCBD; a plot with fewer than two sampled times is a missing plot.
 */
export function rateOfChange(plots: readonly TimedPlot[], options: AnalysisOptions = {}): RateOfChange {
  const slopes = plotSlopes(plots);
  const blocked: BlockedPlot[] = slopes.map((s) => ({ block: s.block, treatment: s.treatment, value: s.slopePerYear }));
  return { slopes, anova: rcbdAnova(blocked, options) };
}
