import { fUpperTailP } from "./distributions";
import { leastSquaresMeans, type LinearModelFit } from "./linear-model";

/** One line of an ANOVA table. `errorTerm` names the row whose mean square divides this one's. */
export interface AnovaRow {
  source: string;
  df: number;
  ss: number;
  ms: number | null;
  f: number | null;
  p: number | null;
  errorTerm: string | null;
}

/**
 * The variance of a linear function c'm of a set of means, written as a sum over error strata:
 * Var(c'm) = Σ_k ms_k · c'M_k c. One stratum for most designs; two for split-plot cell means.
 */
export interface VarianceComponent {
  errorTerm: string;
  ms: number;
  df: number;
  matrix: number[][];
}

/** Least-squares means of one term with what comparisons and contrasts need. */
export interface MeanSet {
  term: string;
  factors: string[];
  /** Level of each factor for each mean. */
  levels: string[][];
  /** Display label of each mean: the level, or levels joined by ":". */
  labels: string[];
  means: number[];
  se: number[];
  n: number[];
  variance: VarianceComponent[];
  /** Set when these means cannot be compared validly; comparisons throw with this text. */
  unavailableReason?: string;
}

/** A missing observation, its design levels and its least-squares estimate (the missing-plot value). */
export interface MissingValue {
  levels: Record<string, string>;
  estimate: number;
}

export type DesignName = "one-way" | "rcbd" | "factorial" | "split-plot" | "ancova";

export interface AnovaResult {
  design: DesignName;
  /** Observed values analysed. */
  n: number;
  missing: MissingValue[];
  table: AnovaRow[];
  /** Mean of the observed values. */
  grandMean: number;
  /** CV % = √MS(residual) / grand mean × 100. */
  cvPercent: number;
  /** Split-plot only: √MS(error a) / grand mean × 100. */
  cvPercentMainPlot?: number;
  /** Least-squares means keyed by term label ("treatment", "A", "A:B", …). */
  means: Record<string, MeanSet>;
  /** "closed-form" for balanced data, "least-squares" (QR, type II) otherwise. */
  method: LinearModelFit["method"];
  fit: LinearModelFit;
}

/** Mean square of a row, or of the residual when `source` is "residual". */
export function rowOf(table: readonly AnovaRow[], source: string): AnovaRow {
  const row = table.find((r) => r.source === source);
  if (!row) throw new Error(`the ANOVA table has no row "${source}"`);
  return row;
}

/**
 * ANOVA rows from a fit: MS = SS/df, F = MS / MS(error term), p = P(F(df, df_error) > F).
 * Terms serving as an error term get no F of their own. Rows end with residual and total.
 */
export function anovaRows(fit: LinearModelFit, errorTermOf: Readonly<Record<string, string>> = {}): AnovaRow[] {
  const residual: AnovaRow = {
    source: "residual",
    df: fit.residual.df,
    ss: fit.residual.ss,
    ms: fit.residual.df > 0 ? fit.residual.ss / fit.residual.df : null,
    f: null,
    p: null,
    errorTerm: null,
  };
  const errorSources = new Set(Object.values(errorTermOf));
  const termRows = fit.termSums.map((t) => ({ source: t.label, df: t.df, ss: t.ss, ms: t.df > 0 ? t.ss / t.df : null }));
  const rows: AnovaRow[] = termRows.map((row) => {
    if (errorSources.has(row.source)) return { ...row, f: null, p: null, errorTerm: null };
    const errorSource = errorTermOf[row.source] ?? "residual";
    const error = errorSource === "residual" ? residual : termRows.find((r) => r.source === errorSource);
    if (!error) throw new Error(`no ANOVA row "${errorSource}" to test ${row.source} against`);
    const f = row.ms !== null && error.ms !== null && error.ms > 0 ? row.ms / error.ms : null;
    const p = f === null ? null : fUpperTailP(f, row.df, error.df);
    return { ...row, f, p, errorTerm: errorSource };
  });
  return [...rows, residual, { source: "total", df: fit.total.df, ss: fit.total.ss, ms: null, f: null, p: null, errorTerm: null }];
}

/** Mean of the observed values. */
export function observedMean(fit: LinearModelFit): number {
  return fit.observed.reduce((s, i) => s + fit.data.y[i], 0) / fit.observed.length;
}

/**
 * Least-squares means of a term tested against one error stratum: Var(m) = MS_error·(X'X)⁻¹
 * projected onto the means, with the error term's df.
 */
export function singleStratumMeans(fit: LinearModelFit, term: string, factors: readonly string[], error: AnovaRow): MeanSet {
  const cells = leastSquaresMeans(fit, factors);
  const ms = error.ms ?? Number.NaN;
  return {
    term,
    factors: cells.factors,
    levels: cells.levels,
    labels: cells.levels.map((l) => l.join(":")),
    means: cells.means,
    se: cells.unscaledCovariance.map((row, i) => Math.sqrt(ms * row[i])),
    n: cells.n,
    variance: [{ errorTerm: error.source, ms, df: error.df, matrix: cells.unscaledCovariance }],
  };
}

/** The missing observations of a fit with their least-squares estimates. */
export function missingValues(fit: LinearModelFit, factorNames: readonly string[]): MissingValue[] {
  return fit.missingPredictions.map(({ index, value }) => ({
    levels: Object.fromEntries(factorNames.map((f) => [f, fit.data.factors[f].levels[fit.data.factors[f].codes[index]]])),
    estimate: value,
  }));
}
