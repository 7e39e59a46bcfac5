// Turns one variable's plot values into the results a researcher reads: the ANOVA of the
// chosen model, least-squares means with letters, differences from the check under the same
// comparison method, and plain notes. Pure: plain records in, a JSON-ready object out.
import {
  baselineAncova,
  compareWithCheck,
  factorialAnova,
  MissingPlotSeasonsError,
  oneWayAnova,
  rateOfChange,
  rcbdAnova,
  separateMeans,
  separateMeansWithin,
  seasonsAnalysis,
  splitPlotAnova,
  type AnovaResult,
  type AnovaRow,
  type ComparisonMethod,
  type LeveledPlot,
  type MeanSeparation,
  type PairwiseComparison,
} from "./stats";

export type TrialDesignId = "crd" | "rcbd" | "factorial_rcbd" | "split_plot";
export type ResultsModel = "per_season" | "split_plot_time" | "change_from_baseline" | "rate_of_change";

export const MODEL_LABELS: Record<ResultsModel, string> = {
  per_season: "One season",
  split_plot_time: "Across seasons (split-plot in time)",
  change_from_baseline: "Change from baseline (ANCOVA)",
  rate_of_change: "Rate of change (per-plot slopes)",
};

/** One plot's value of the chosen variable and depth in one season. */
export interface PlotObservation {
  plotNumber: number;
  /** Block number; null in a completely randomized design. */
  block: number | null;
  treatment: string;
  season: string;
  /** Order of the season in the trial (baseline first). */
  seasonOrder: number;
  isBaseline: boolean;
  /** Years from the baseline sampling to this one, for rates of change. */
  yearsFromBaseline: number;
  /** Null when the value is missing or was excluded in QC. */
  value: number | null;
  excluded: boolean;
}

export interface TreatmentInfo {
  code: string;
  name: string;
  isCheck: boolean;
  /** Factorial and split-plot trials: the level of each factor. */
  factorLevels?: Record<string, string> | null;
}

export interface FactorInfo {
  name: string;
  stratum?: "main" | "sub" | null;
}

export interface ResultsRequest {
  design: TrialDesignId;
  treatments: readonly TreatmentInfo[];
  factors?: readonly FactorInfo[];
  model: ResultsModel;
  /** The season analysed (per-season and change-from-baseline models). */
  season?: string;
  method: ComparisonMethod;
  alpha: number;
}

export interface TreatmentResult {
  code: string;
  name: string;
  isCheck: boolean;
  n: number;
  mean: number;
  se: number;
  group: string;
  /** Difference from the check (treatment − check) under the declared method. */
  vsCheck: { diff: number; se: number; lower: number; upper: number; p: number; significant: boolean } | null;
}

export interface SeasonMeans {
  season: string;
  means: { code: string; mean: number; se: number; n: number; group: string }[];
}

export interface ResultsPayload {
  model: ResultsModel;
  modelLabel: string;
  design: TrialDesignId;
  season: string | null;
  method: ComparisonMethod;
  alpha: number;
  /** Observed values analysed. */
  n: number;
  excludedCount: number;
  /** Plot values absent from the analysis, and the least-squares estimates where the design fills them. */
  missing: { plotNumber: number | null; season: string | null; estimate: number | null }[];
  anova: AnovaRow[];
  grandMean: number;
  cvPercent: number;
  cvPercentMainPlot: number | null;
  sphericity: { epsilon: number; assumption: string; adjusted: { source: string; df1: number; df2: number; p: number }[] } | null;
  /** The treatment (or treatment-combination) means compared. */
  means: TreatmentResult[];
  comparisons: (PairwiseComparison & { aName: string; bName: string })[];
  criticalDifference: number | null;
  /** Across seasons: the treatment means within each season, letters within season. */
  seasonMeans: SeasonMeans[];
  /** Rate of change: units per year. Change from baseline: the covariate's slope. */
  extra: Record<string, number | string | null>;
  notes: string[];
}

/** A request that cannot be analysed as asked; the message says why and what to do instead. */
export class ResultsError extends Error {
  constructor(
    message: string,
    readonly missing: { plotNumber: number | null; season: string | null }[] = [],
  ) {
    super(message);
    this.name = "ResultsError";
  }
}

const blockLabel = (b: number | null) => (b === null ? "" : String(b));

function treatmentTerm(request: ResultsRequest): { term: string; labelToCode: Map<string, string> } {
  if (request.design === "crd" || request.design === "rcbd") {
    return { term: "treatment", labelToCode: new Map(request.treatments.map((t) => [t.code, t.code])) };
  }
  const names = factorNames(request);
  const labelToCode = new Map(
    request.treatments.map((t) => [names.map((f) => t.factorLevels?.[f] ?? "").join(":"), t.code]),
  );
  return { term: names.join(":"), labelToCode };
}

function factorNames(request: ResultsRequest): string[] {
  const factors = request.factors ?? [];
  if (request.design === "split_plot") {
    const main = factors.find((f) => f.stratum === "main");
    const sub = factors.find((f) => f.stratum === "sub");
    if (!main || !sub) throw new ResultsError("This split-plot trial needs one main-plot factor and one sub-plot factor.");
    return [main.name, sub.name];
  }
  if (factors.length < 2) throw new ResultsError("This factorial trial needs at least two factors with levels.");
  return factors.map((f) => f.name);
}

function leveled(request: ResultsRequest, rows: readonly PlotObservation[]): LeveledPlot[] {
  const byCode = new Map(request.treatments.map((t) => [t.code, t]));
  const names = request.design === "factorial_rcbd" || request.design === "split_plot" ? factorNames(request) : [];
  return rows.map((r) => {
    const t = byCode.get(r.treatment);
    const factorLevels = Object.fromEntries(names.map((f) => [f, t?.factorLevels?.[f] ?? ""]));
    return { levels: { block: blockLabel(r.block), treatment: r.treatment, ...factorLevels }, value: r.value };
  });
}

/** The ANOVA of one season's plots under the trial's design. */
function seasonAnova(request: ResultsRequest, rows: readonly PlotObservation[]): AnovaResult {
  switch (request.design) {
    case "crd":
      return oneWayAnova(rows.map((r) => ({ treatment: r.treatment, value: r.value })));
    case "rcbd":
      return rcbdAnova(rows.map((r) => ({ block: blockLabel(r.block), treatment: r.treatment, value: r.value })));
    case "factorial_rcbd":
      return factorialAnova(leveled(request, rows), { factors: factorNames(request), block: "block" });
    case "split_plot": {
      const [main, sub] = factorNames(request);
      return splitPlotAnova(leveled(request, rows), { block: "block", main: [main], sub: [sub] });
    }
  }
}

function describeMeans(
  request: ResultsRequest,
  separation: MeanSeparation,
  vsCheck: PairwiseComparison[] | null,
  labelToCode: Map<string, string>,
  check: TreatmentInfo | undefined,
): TreatmentResult[] {
  const byCode = new Map(request.treatments.map((t) => [t.code, t]));
  const checkLabel = check ? [...labelToCode].find(([, code]) => code === check.code)?.[0] : undefined;
  const order = new Map(request.treatments.map((t, i) => [t.code, i]));
  return separation.means
    .map((m) => {
      const code = labelToCode.get(m.label) ?? m.label;
      const t = byCode.get(code);
      const c = vsCheck?.find((p) => p.a === m.label || p.b === m.label);
      // compareWithCheck reports treatment − check; keep that orientation.
      const versus =
        c && m.label !== checkLabel
          ? { diff: c.diff, se: c.se, lower: c.lower, upper: c.upper, p: c.p, significant: c.significant }
          : null;
      return { code, name: t?.name ?? code, isCheck: t?.isCheck ?? false, n: m.n, mean: m.mean, se: m.se, group: m.group, vsCheck: versus };
    })
    .sort((a, b) => (order.get(a.code) ?? 0) - (order.get(b.code) ?? 0));
}

function nameOf(request: ResultsRequest, labelToCode: Map<string, string>, label: string) {
  const code = labelToCode.get(label) ?? label;
  return request.treatments.find((t) => t.code === code)?.name ?? label;
}

function methodNotes(request: ResultsRequest, separation: MeanSeparation): string[] {
  const notes: string[] = [];
  if (separation.note) notes.push(separation.note);
  if (request.method === "lsd" && separation.protectedByF === false) {
    notes.push(
      `Fisher's protected LSD is shown although the treatment F test is not significant at α = ${request.alpha}: ` +
        "no pairwise differences are declared.",
    );
  }
  return notes;
}

function missingNotes(result: AnovaResult): string[] {
  if (result.missing.length === 0) return [];
  return [
    `${result.missing.length} missing plot value${result.missing.length === 1 ? "" : "s"}: sums of squares are adjusted ` +
      "(type II, least squares), the residual df is reduced accordingly, and means are least-squares means.",
  ];
}

function assemble(
  request: ResultsRequest,
  rows: readonly PlotObservation[],
  result: AnovaResult,
  term: string,
  labelToCode: Map<string, string>,
  season: string | null,
): ResultsPayload {
  const check = request.treatments.find((t) => t.isCheck);
  const options = { method: request.method, alpha: request.alpha };
  const residual = result.table.find((r) => r.source === "residual");
  if (!residual || !residual.ms || residual.df <= 0) {
    throw new ResultsError(
      "There is no residual variation left (every value fits the model exactly, or no error degrees of freedom remain), " +
        "so F tests and comparisons cannot be made. Check for copied values or too few plots.",
    );
  }
  const separation = separateMeans(result, term, options);
  const checkLabel = check ? [...labelToCode].find(([, code]) => code === check.code)?.[0] : undefined;
  const vsCheck = checkLabel ? compareWithCheck(result, term, checkLabel, options) : null;
  const notes = [...missingNotes(result), ...methodNotes(request, separation)];
  if (!check) notes.push("No treatment is marked as the untreated check, so differences from the check are not shown.");
  return {
    model: request.model,
    modelLabel: MODEL_LABELS[request.model],
    design: request.design,
    season,
    method: request.method,
    alpha: request.alpha,
    n: result.n,
    excludedCount: rows.filter((r) => r.excluded).length,
    missing: result.missing.map((m) => ({
      plotNumber: rows.find((r) => blockLabel(r.block) === m.levels.block && r.treatment === (labelToCode.get(m.levels.treatment) ?? m.levels.treatment))?.plotNumber ?? null,
      season: m.levels.season ?? season,
      estimate: m.estimate,
    })),
    anova: result.table,
    grandMean: result.grandMean,
    cvPercent: result.cvPercent,
    cvPercentMainPlot: result.cvPercentMainPlot ?? null,
    sphericity: null,
    means: describeMeans(request, separation, vsCheck, labelToCode, check),
    comparisons: separation.comparisons.map((c) => ({
      ...c,
      aName: nameOf(request, labelToCode, c.a),
      bName: nameOf(request, labelToCode, c.b),
    })),
    criticalDifference: separation.criticalDifference,
    seasonMeans: [],
    extra: {},
    notes,
  };
}

function seasonsInOrder(rows: readonly PlotObservation[]): string[] {
  return [...new Map([...rows].sort((a, b) => a.seasonOrder - b.seasonOrder).map((r) => [r.season, r.season])).keys()];
}

/** A season counts as measured when it has at least this share of the plots of the best-covered season. */
export const MEASURED_SHARE = 0.8;

/**
 * The season shown when none is chosen: the latest one measured on at least four-fifths of the
 * plots (a missing plot or two is normal; a season whose results are still arriving is not), else
 * the latest. `skipped` names newer seasons passed over, with their plot counts, for a note.
 */
export function defaultSeason(rows: readonly PlotObservation[]): { season: string; skipped: { season: string; plots: number; of: number }[] } | null {
  const seasons = seasonsInOrder(rows);
  if (seasons.length === 0) return null;
  const plots = new Map(seasons.map((s) => [s, new Set(rows.filter((r) => r.season === s).map((r) => r.plotNumber)).size]));
  const most = Math.max(...plots.values());
  const measured = seasons.filter((s) => plots.get(s)! >= MEASURED_SHARE * most);
  const season = measured.at(-1) ?? seasons.at(-1)!;
  const skipped = seasons.slice(seasons.indexOf(season) + 1).map((s) => ({ season: s, plots: plots.get(s)!, of: most }));
  return { season, skipped };
}

/**
 * Analyses one variable at one depth under the requested model.
 * Throws `ResultsError` with a researcher-readable message when the request cannot be honoured.
 */
export function analyzeResults(rows: readonly PlotObservation[], request: ResultsRequest): ResultsPayload {
  return fitResults(rows, request).payload;
}

/** A payload with the fitted model behind it: what contrasts and residual checks need beyond the JSON. */
export interface FittedResults {
  payload: ResultsPayload;
  anova: AnovaResult;
  /** The term whose means are the treatments (or treatment combinations) compared. */
  term: string;
  /** Label of a mean in `anova.means[term]` → treatment code. */
  labelToCode: Map<string, string>;
  /**
   * The observations given to the model, in its order: residual rows index into this. For the rate
   * of change the model sees one slope per plot instead, and this holds every observation behind them.
   */
  analysed: readonly PlotObservation[];
}

/** `analyzeResults`, keeping the fitted model. */
export function fitResults(rows: readonly PlotObservation[], request: ResultsRequest): FittedResults {
  if (rows.length === 0) throw new ResultsError("There are no values of this variable at this depth yet.");
  const { term, labelToCode } = treatmentTerm(request);
  const treatmentRows = rows.filter((r) => !r.isBaseline);
  try {
    switch (request.model) {
      case "per_season": {
        const chosen = request.season ? { season: request.season, skipped: [] } : defaultSeason(rows);
        const season = chosen?.season ?? "";
        const inSeason = rows.filter((r) => r.season === season);
        if (inSeason.length === 0) throw new ResultsError(`There are no values in season “${season}”.`);
        const anova = seasonAnova(request, inSeason);
        const payload = assemble(request, inSeason, anova, term, labelToCode, season);
        for (const s of chosen?.skipped ?? []) {
          payload.notes.push(`${s.season} is not shown by default: ${s.plots} of ${s.of} plots measured so far. Choose it under Season to analyse it anyway.`);
        }
        return { payload, anova, term, labelToCode, analysed: inSeason };
      }
      case "split_plot_time": {
        if (request.design === "split_plot") {
          throw new ResultsError("For a split-plot trial, analyse each season on its own (a further stratum for seasons is later work).");
        }
        const seasons = seasonsInOrder(treatmentRows);
        if (seasons.length < 2) throw new ResultsError("An analysis across seasons needs at least two seasons after the baseline.");
        const treatmentFactors = request.design === "factorial_rcbd" ? factorNames(request) : ["treatment"];
        const plots = treatmentRows.map((r, i) => ({
          levels: { ...leveled(request, [r])[0].levels, season: r.season, plot: String(r.plotNumber) },
          value: treatmentRows[i].value,
        }));
        const layout =
          request.design === "crd"
            ? { plot: "plot", treatments: treatmentFactors, season: "season" }
            : { block: "block", treatments: treatmentFactors, season: "season" };
        const result = seasonsAnalysis(plots, layout);
        const payload = assemble(request, treatmentRows, result, term, labelToCode, null);
        const cellTerm = `${term}:season`;
        const within = separateMeansWithin(result, cellTerm, "season", { method: request.method, alpha: request.alpha });
        payload.seasonMeans = seasons.map((s) => ({
          season: s,
          means: (within[s]?.means ?? []).map((m) => {
            const label = m.label.split(":").filter((_, i, all) => i < all.length - 1).join(":");
            return { code: labelToCode.get(label) ?? label, mean: m.mean, se: m.se, n: m.n, group: m.group };
          }),
        }));
        payload.sphericity = result.sphericity;
        payload.notes.push(
          `Greenhouse–Geisser ε = ${result.sphericity.epsilon.toFixed(3)}; ${result.sphericity.assumption}.`,
          "Treatment means are averaged over seasons; letters within each season compare treatments in that season only.",
        );
        const baselineSeasons = seasonsInOrder(rows.filter((r) => r.isBaseline));
        if (baselineSeasons.length > 0) {
          payload.notes.push(`The baseline (${baselineSeasons.join(", ")}) is left out: it was sampled before the treatments were applied.`);
        }
        return { payload, anova: result, term, labelToCode, analysed: treatmentRows };
      }
      case "change_from_baseline": {
        if (request.design !== "crd" && request.design !== "rcbd") {
          throw new ResultsError("Change from baseline is available for single-factor trials; analyse each season instead.");
        }
        const baseline = rows.filter((r) => r.isBaseline);
        if (baseline.length === 0) throw new ResultsError("This trial has no baseline sampling, so change from baseline cannot be computed.");
        const season = request.season ?? seasonsInOrder(treatmentRows).at(-1);
        if (!season) throw new ResultsError("There are no seasons after the baseline yet.");
        const later = treatmentRows.filter((r) => r.season === season);
        const baseOf = new Map(baseline.filter((b) => b.value !== null).map((b) => [b.plotNumber, b.value as number]));
        const withoutBaseline = later.filter((r) => !baseOf.has(r.plotNumber)).map((r) => r.plotNumber);
        const plots = later
          .filter((r) => baseOf.has(r.plotNumber))
          .map((r) => ({
            ...(request.design === "rcbd" ? { block: blockLabel(r.block) } : {}),
            treatment: r.treatment,
            baseline: baseOf.get(r.plotNumber)!,
            value: r.value,
          }));
        const result = baselineAncova(plots);
        const payload = assemble(request, later, result, "treatment", labelToCode, season);
        payload.extra = { covariateSlope: result.slope.estimate, covariateSlopeSe: result.slope.se, baselineMean: result.baselineMean };
        payload.notes.push(
          `Means are changes from the baseline (${baseline[0].season}), adjusted to the mean baseline value ${result.baselineMean.toFixed(3)} by analysis of covariance.`,
        );
        if (withoutBaseline.length > 0) {
          payload.notes.push(`Plots without a baseline value are left out: ${withoutBaseline.join(", ")}.`);
        }
        return { payload, anova: result, term: "treatment", labelToCode, analysed: later.filter((r) => baseOf.has(r.plotNumber)) };
      }
      case "rate_of_change": {
        if (request.design !== "rcbd") throw new ResultsError("Rate of change is analysed as an RCBD; this trial has another design.");
        const result = rateOfChange(
          rows.map((r) => ({ block: blockLabel(r.block), treatment: r.treatment, timeYears: r.yearsFromBaseline, value: r.value })),
        );
        const payload = assemble(request, rows, result.anova, "treatment", labelToCode, null);
        payload.extra = { unit: "per year" };
        payload.notes.push(
          "Each plot's least-squares slope over all its sampling times (baseline included), in units per year, analysed as an RCBD.",
        );
        return { payload, anova: result.anova, term: "treatment", labelToCode, analysed: rows };
      }
    }
  } catch (error) {
    if (error instanceof MissingPlotSeasonsError) {
      const missing = error.missing.map((m) => ({
        plotNumber: rows.find((r) => blockLabel(r.block) === m.block && r.treatment === m.treatment)?.plotNumber ?? null,
        season: m.season ?? null,
      }));
      const listed = missing.map((m) => `plot ${m.plotNumber ?? "?"} in ${m.season}`).join("; ");
      throw new ResultsError(
        `The split-plot in time needs every plot in every season, and ${missing.length} ${missing.length === 1 ? "is" : "are"} missing (${listed}). Analyse each season on its own instead.`,
        missing,
      );
    }
    if (error instanceof ResultsError) throw error;
    if (error instanceof Error) throw new ResultsError(error.message.charAt(0).toUpperCase() + error.message.slice(1));
    throw error;
  }
}
