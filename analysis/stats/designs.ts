import {
  anovaRows,
  missingValues,
  observedMean,
  rowOf,
  singleStratumMeans,
  type AnovaResult,
  type AnovaRow,
  type DesignName,
  type MeanSet,
} from "./anova-table";
import { fitLinearModel, leastSquaresMeans, type FitMethod, type LinearModelFit } from "./linear-model";
import { crossedTerm, type Term } from "./model-data";
import {
  checkComplete,
  checkLevelCount,
  checkObservedLevels,
  checkValues,
  levelsOf,
  toModelData,
  type LeveledPlot,
  type PlotValue,
} from "./plot-records";

export interface AnalysisOptions {
  /** Force closed-form or least-squares sums of squares; "auto" picks closed form for balanced data. */
  method?: FitMethod | "auto";
}

/** A plot of a single-factor trial. */
export interface TreatmentPlot {
  treatment: string;
  value: PlotValue;
}

/** A plot of a randomized complete block design. */
export interface BlockedPlot {
  block: string;
  treatment: string;
  value: PlotValue;
}

/** Every non-empty subset of the factors as crossed terms, by order then position (A, B, A:B). */
export function factorialTerms(factors: readonly string[]): Term[] {
  const subsets = factors
    .reduce<string[][]>((acc, f) => acc.concat(acc.map((s) => [...s, f])), [[]])
    .filter((s) => s.length > 0);
  subsets.sort((a, b) => a.length - b.length || factors.indexOf(a[0]) - factors.indexOf(b[0]));
  return subsets.map((s) => crossedTerm(...s));
}

function checkResidualDf(fit: LinearModelFit): void {
  if (fit.residual.df <= 0) {
    throw new Error("there are no degrees of freedom left for error: the design needs more replication");
  }
}

/** Assembles a single-error-stratum result (one-way, RCBD, factorial). */
function singleStratumResult(
  design: DesignName,
  fit: LinearModelFit,
  factorNames: readonly string[],
  meanTerms: readonly Term[],
): AnovaResult {
  checkResidualDf(fit);
  const table = anovaRows(fit);
  const residual = rowOf(table, "residual");
  const grandMean = observedMean(fit);
  const means: Record<string, MeanSet> = {};
  for (const term of meanTerms) means[term.label] = singleStratumMeans(fit, term.label, term.parts[0], residual);
  return {
    design,
    n: fit.observed.length,
    missing: missingValues(fit, factorNames),
    table,
    grandMean,
    cvPercent: (Math.sqrt(residual.ms ?? Number.NaN) / grandMean) * 100,
    means,
    method: fit.method,
    fit,
  };
}

/**
 * One-way ANOVA of a completely randomized design: y_ij = μ + τ_i + ε_ij; SS treatment on t − 1 df
 * against the residual on N − t df (Montgomery, DAE, ch. 3). Unequal replication is allowed.
 */
export function oneWayAnova(plots: readonly TreatmentPlot[], options: AnalysisOptions = {}): AnovaResult {
  const leveled: LeveledPlot[] = plots.map((p) => ({ levels: { treatment: p.treatment }, value: p.value }));
  checkValues(leveled, ["treatment"]);
  checkLevelCount(leveled, "treatment", 2, "a one-way ANOVA");
  checkObservedLevels(leveled, "treatment");
  const terms = [crossedTerm("treatment")];
  const fit = fitLinearModel(toModelData(leveled, ["treatment"]), terms, options.method);
  return singleStratumResult("one-way", fit, ["treatment"], terms);
}

/**
 * ANOVA of a randomized complete block design: y_ij = μ + τ_i + β_j + ε_ij; rows block,
 * treatment and residual on (t − 1)(b − 1) df (Montgomery, DAE, §4.1). Missing plots are
 * fitted by least squares, each term adjusted for the other (type II), residual df reduced.
 */
export function rcbdAnova(plots: readonly BlockedPlot[], options: AnalysisOptions = {}): AnovaResult {
  const names = ["block", "treatment"];
  const leveled: LeveledPlot[] = plots.map((p) => ({ levels: { block: p.block, treatment: p.treatment }, value: p.value }));
  checkValues(leveled, names);
  checkLevelCount(leveled, "block", 2, "an RCBD");
  checkLevelCount(leveled, "treatment", 2, "an RCBD");
  checkComplete(leveled, names);
  checkObservedLevels(leveled, "treatment");
  checkObservedLevels(leveled, "block");
  const terms = [crossedTerm("block"), crossedTerm("treatment")];
  const fit = fitLinearModel(toModelData(leveled, names), terms, options.method);
  return singleStratumResult("rcbd", fit, names, [terms[1]]);
}

export interface FactorialOptions extends AnalysisOptions {
  /** The treatment factors, 2 or 3 of the level names, e.g. ["material", "temperature"]. */
  factors: string[];
  /** Name of the block factor among the levels; omit for a completely randomized factorial. */
  block?: string;
}

/**
 * Factorial ANOVA (2 or 3 factors), in blocks or completely randomized: every main effect and
 * interaction, each tested against the residual (Montgomery, DAE, §5.3 and §5.6).
 */
export function factorialAnova(plots: readonly LeveledPlot[], options: FactorialOptions): AnovaResult {
  const { factors, block } = options;
  if (factors.length < 2 || factors.length > 3) throw new Error("a factorial analysis takes 2 or 3 treatment factors");
  const names = block ? [block, ...factors] : [...factors];
  checkValues(plots, names);
  for (const f of factors) checkLevelCount(plots, f, 2, "a factorial analysis");
  if (block) {
    checkLevelCount(plots, block, 2, "a blocked factorial");
    checkComplete(plots, names);
  } else {
    checkComplete(plots, factors, true);
  }
  const treatmentTerms = factorialTerms(factors);
  const terms = block ? [crossedTerm(block), ...treatmentTerms] : treatmentTerms;
  const fit = fitLinearModel(toModelData(plots, names), terms, options.method);
  return singleStratumResult("factorial", fit, names, treatmentTerms);
}

export interface SplitPlotOptions extends AnalysisOptions {
  /** Block factor; whole plots are block × main combinations. */
  block?: string;
  /**
   * Without blocks (main plots completely randomized): the factor naming each whole plot;
   * error(a) is then plot within the main-plot treatments.
   */
  plot?: string;
  /** Main-plot factor(s), applied to whole plots. */
  main: string[];
  /** Sub-plot factor(s), applied within each whole plot (seasons, for a split-plot in time). */
  sub: string[];
}

/**
 * Terms of a split-plot in blocks: block, the main-plot factorial, error(a) = block × main
 * combinations (pooling block:A, block:B, block:A:B when the main plot is itself factorial),
 * then the sub-plot factorial and its interactions with the main-plot factors.
 */
export function splitPlotTerms(block: string, main: readonly string[], sub: readonly string[]): { terms: Term[]; errorA: Term } {
  const mainTerms = factorialTerms(main);
  const errorA: Term = { label: [block, ...main].join(":"), parts: mainTerms.map((t) => [block, ...t.parts[0]]) };
  const subTerms = factorialTerms([...main, ...sub]).filter((t) => t.parts[0].some((f) => sub.includes(f)));
  return { terms: [crossedTerm(block), ...mainTerms, errorA, ...subTerms], errorA };
}

/**
 * Terms of a split-plot whose main plots are completely randomized: the main-plot factorial,
 * error(a) = plot(main) — the replicate index within each main combination, i.e. the pooled
 * parts rep + rep:A + … — then the sub-plot terms (Steel & Torrie 1980, §16.2).
 */
export function nestedSplitPlotTerms(plot: string, main: readonly string[], sub: readonly string[]): { terms: Term[]; errorA: Term } {
  const mainTerms = factorialTerms(main);
  const errorA: Term = { label: `${plot}(${main.join(":")})`, parts: [[plot], ...mainTerms.map((t) => [...t.parts[0], plot])] };
  const subTerms = factorialTerms([...main, ...sub]).filter((t) => t.parts[0].some((f) => sub.includes(f)));
  return { terms: [...mainTerms, errorA, ...subTerms], errorA };
}

/**
 * Completely randomized whole plots: checks each plot carries one main combination and every
 * sub-plot level, then renames plots by their replicate number within the main combination so
 * the plot factor crosses the treatments.
 */
function plotsAsReplicates(plots: readonly LeveledPlot[], plot: string, main: readonly string[], sub: readonly string[]): LeveledPlot[] {
  const mainOf = new Map<string, string>();
  const repOf = new Map<string, string>();
  const counts = new Map<string, number>();
  for (const p of plots) {
    const id = p.levels[plot];
    const combo = main.map((f) => p.levels[f]).join(":");
    const seen = mainOf.get(id);
    if (seen !== undefined && seen !== combo) throw new Error(`${plot} ${id} appears under both ${seen} and ${combo}`);
    if (seen === undefined) {
      mainOf.set(id, combo);
      const rep = (counts.get(combo) ?? 0) + 1;
      counts.set(combo, rep);
      repOf.set(id, String(rep));
    }
  }
  checkComplete(plots, [plot, ...sub]);
  return plots.map((p) => ({ levels: { ...p.levels, [plot]: repOf.get(p.levels[plot])! }, value: p.value }));
}

/**
 * Variance components of split-plot means for a balanced layout with r replicates, a main-plot
 * and b sub-plot combinations. With whole-plot error variance σ²_δ = (E_a − E_b)/b
 * (E(E_a) = σ² + bσ²_δ, E(E_b) = σ²), a linear function of cell means has
 * Var(Σc_ij ȳ_ij) = [E_a Σ_i c_i.²/b + E_b(Σc_ij² − Σ_i c_i.²/b)]/r
 * (Gomez & Gomez 1984, Statistical Procedures for Agricultural Research, §3.4.2 and Table 3.11;
 * Steel & Torrie 1980, §16.3). Each mean here averages a set of cells; `mainCounts[p][i]` is how
 * many of mean p's cells lie in main combination i. Returns the E_a and E_b coefficient matrices.
 */
export function splitPlotMeanVariance(
  r: number,
  b: number,
  mainCounts: readonly (readonly number[])[],
): { mainPlot: number[][]; subPlot: number[][] } {
  const sizes = mainCounts.map((counts) => counts.reduce((s, v) => s + v, 0));
  const count = mainCounts.length;
  // Σ over cell pairs sharing a main combination, common[p·count + q]: accumulated per main
  // combination, since most means lie in one or a few of them. `sharing` lists the pairs that
  // share one; for two means that share none both entries are 0, which the rows start with.
  const common = new Float64Array(count * count);
  const sharing: number[] = [];
  const mainTotal = mainCounts[0]?.length ?? 0;
  for (let i = 0; i < mainTotal; i++) {
    const inMain: number[] = [];
    for (let p = 0; p < count; p++) if (mainCounts[p][i] !== 0) inMain.push(p);
    for (const p of inMain) {
      for (const q of inMain) {
        if (common[p * count + q] === 0) sharing.push(p * count + q);
        common[p * count + q] += mainCounts[p][i] * mainCounts[q][i];
      }
    }
  }
  const mainPlot = Array.from({ length: count }, () => new Array<number>(count).fill(0));
  const subPlot = Array.from({ length: count }, () => new Array<number>(count).fill(0));
  const setEntries = (p: number, q: number) => {
    const sameMain = common[p * count + q] / (sizes[p] * sizes[q]);
    // The shared cells: the means partition the cells, so only a mean shares cells with itself.
    const shared = p === q ? 1 / sizes[p] : 0;
    mainPlot[p][q] = sameMain / (r * b);
    subPlot[p][q] = (shared - sameMain / b) / r;
  };
  for (let p = 0; p < count; p++) setEntries(p, p);
  for (const pq of sharing) if (Math.floor(pq / count) !== pq % count) setEntries(Math.floor(pq / count), pq % count);
  return { mainPlot, subPlot };
}

function splitPlotMeans(
  fit: LinearModelFit,
  term: Term,
  main: readonly string[],
  sub: readonly string[],
  errorA: AnovaRow,
  errorB: AnovaRow,
  replicates: number,
): MeanSet {
  const factors = term.parts[0];
  const { data } = fit;
  const levelCount = (f: string) => data.factors[f].levels.length;
  const subCount = sub.reduce((c, f) => c * levelCount(f), 1);
  const own = leastSquaresMeans(fit, factors);
  // For each mean, how many of its cells fall in each main-plot combination: all the sub-plot
  // combinations it spans where the main-plot factors it fixes agree, none elsewhere.
  const mainCombos = main.reduce<number[][]>((acc, f) => acc.flatMap((c) => data.factors[f].levels.map((_, i) => [...c, i])), [[]]);
  const cellsPerMain = sub.reduce((c, f) => (factors.includes(f) ? c : c * levelCount(f)), 1);
  const fixedMain = main.flatMap((f, k) => (factors.includes(f) ? [{ k, levels: data.factors[f].levels, position: factors.indexOf(f) }] : []));
  const mainCounts = own.levels.map((levels) =>
    mainCombos.map((combo) => (fixedMain.every((m) => m.levels[combo[m.k]] === levels[m.position]) ? cellsPerMain : 0)),
  );
  const { mainPlot, subPlot } = splitPlotMeanVariance(replicates, subCount, mainCounts);
  const variance = [
    { errorTerm: errorA.source, ms: errorA.ms ?? Number.NaN, df: errorA.df, matrix: mainPlot },
    { errorTerm: errorB.source, ms: errorB.ms ?? Number.NaN, df: errorB.df, matrix: subPlot },
  ];
  const balanced = fit.method === "closed-form";
  return {
    term: term.label,
    factors: own.factors,
    levels: own.levels,
    labels: own.levels.map((l) => l.join(":")),
    means: own.means,
    se: own.means.map((_, i) => (balanced ? Math.sqrt(variance.reduce((s, c) => s + c.ms * c.matrix[i][i], 0)) : Number.NaN)),
    n: own.n,
    variance,
    unavailableReason: balanced
      ? undefined
      : "comparisons in a split-plot with missing sub-plots need a mixed model, which Tilthmark does not fit yet; use the ANOVA table and compare means within complete data",
  };
}

/**
 * Split-plot ANOVA: block, main, error(a) = block:main, sub, main:sub, error(b) = residual —
 * or, with whole plots completely randomized, error(a) = plot(main). Block and main-plot terms
 * are tested against error(a), sub-plot terms against error(b) (Montgomery, DAE, §14.5; Gomez & Gomez 1984, §3.4). Least-squares means carry both
 * strata so comparisons that mix them get the combined SE with Satterthwaite df.
 */
export function splitPlotAnova(plots: readonly LeveledPlot[], options: SplitPlotOptions): AnovaResult {
  const { block, plot, main, sub } = options;
  if (main.length === 0 || sub.length === 0) throw new Error("a split-plot needs at least one main-plot and one sub-plot factor");
  if ((block === undefined) === (plot === undefined)) throw new Error("a split-plot needs either a block factor or, without blocks, a plot factor");
  const unit = (block ?? plot)!;
  const names = [unit, ...main, ...sub];
  checkValues(plots, names);
  for (const f of [...main, ...sub]) checkLevelCount(plots, f, 2, "a split-plot");
  let analysed = plots;
  if (block) {
    checkLevelCount(plots, block, 2, "a split-plot");
    checkComplete(plots, names);
  } else {
    analysed = plotsAsReplicates(plots, unit, main, sub);
  }
  const { terms, errorA } = block ? splitPlotTerms(block, main, sub) : nestedSplitPlotTerms(unit, main, sub);
  const fit = fitLinearModel(toModelData(analysed, names), terms, options.method);
  checkResidualDf(fit);
  const errorTermOf: Record<string, string> = {};
  for (const t of terms) {
    if (t === errorA) continue;
    errorTermOf[t.label] = t.parts[0].some((f) => sub.includes(f)) ? "residual" : errorA.label;
  }
  const table = anovaRows(fit, errorTermOf);
  const rowA = rowOf(table, errorA.label);
  const rowB = rowOf(table, "residual");
  const grandMean = observedMean(fit);
  const replicates = levelsOf(analysed, unit).length;
  const means: Record<string, MeanSet> = {};
  for (const t of terms) {
    if (t === errorA || t.label === block) continue;
    means[t.label] = splitPlotMeans(fit, t, main, sub, rowA, rowB, replicates);
  }
  return {
    design: "split-plot",
    n: fit.observed.length,
    // Report the plot names the researcher gave, not the replicate numbers used inside.
    missing: missingValues(fit, names).map((m, k) => ({
      ...m,
      levels: { ...m.levels, [unit]: plots[fit.missingPredictions[k].index].levels[unit] },
    })),
    table,
    grandMean,
    cvPercent: (Math.sqrt(rowB.ms ?? Number.NaN) / grandMean) * 100,
    cvPercentMainPlot: (Math.sqrt(rowA.ms ?? Number.NaN) / grandMean) * 100,
    means,
    method: fit.method,
    fit,
  };
}
