import type { AnovaResult, MeanSet } from "./anova-table";
import { studentizedRangeQuantile, studentizedRangeUpperP, tQuantile, tTwoSidedP } from "./distributions";
import { compactLetterDisplay } from "./letters";
import { pairDifferenceVariance } from "./satterthwaite";

/** Tukey–Kramer (default) or Fisher's protected least significant difference. */
export type ComparisonMethod = "tukey" | "lsd";

export interface ComparisonOptions {
  method?: ComparisonMethod;
  /** Significance level, 0.05 by default; CIs are 100(1 − α) %. */
  alpha?: number;
}

/** One difference between two means, a − b. */
export interface PairwiseComparison {
  a: string;
  b: string;
  diff: number;
  se: number;
  /** Error df, Satterthwaite's when the difference mixes strata. */
  df: number;
  lower: number;
  upper: number;
  /** Adjusted p-value (Tukey–Kramer) or unadjusted t-test p-value (LSD). */
  p: number;
  significant: boolean;
}

export interface SeparatedMean {
  label: string;
  mean: number;
  se: number;
  n: number;
  /** Compact letter display: 'a' for the highest mean. */
  group: string;
}

export interface MeanSeparation {
  term: string;
  method: ComparisonMethod;
  alpha: number;
  means: SeparatedMean[];
  comparisons: PairwiseComparison[];
  /** Tukey's HSD or the LSD when every pair has the same SE and df (balanced data); otherwise null. */
  criticalDifference: number | null;
  /** For LSD: whether the term's F test was significant; no differences are declared if not. */
  protectedByF: boolean | null;
  note: string | null;
}

const criticalValues = new Map<string, number>();
/** The value asked for last: every pair of a balanced family asks for it again, so no key is built. */
let lastCritical = { method: "", alpha: Number.NaN, k: Number.NaN, df: Number.NaN, value: Number.NaN };

/** q_{1−α}(k, ν) or t_{1−α/2, ν}, remembered because every pair of a balanced set asks for the same one. */
function criticalValue(method: ComparisonMethod, alpha: number, k: number, df: number): number {
  const lc = lastCritical;
  if (lc.method === method && lc.alpha === alpha && lc.k === k && lc.df === df) return lc.value;
  const key = `${method}|${alpha}|${k}|${df}`;
  let value = criticalValues.get(key);
  if (value === undefined) {
    value = method === "tukey" ? studentizedRangeQuantile(1 - alpha, k, df) : tQuantile(1 - alpha / 2, df);
    if (criticalValues.size > 10_000) criticalValues.clear();
    criticalValues.set(key, value);
  }
  lastCritical = { method, alpha, k, df, value };
  return value;
}

/**
 * Difference i − j of two means with its SE and df (combined SE with Satterthwaite df when
 * the means lie in different strata), tested by the chosen method:
 * - Tukey–Kramer: q = |d|/(SE/√2), p = P(Q_{k,ν} > q), CI d ± q_{1−α}(k, ν)·SE/√2
 *   (Tukey 1953; Kramer 1956, Biometrics 12:307–310);
 * - LSD: t = d/SE, p = 2P(T_ν > |t|), CI d ± t_{1−α/2,ν}·SE (Fisher 1935).
 */
export function compareTwoMeans(set: MeanSet, i: number, j: number, method: ComparisonMethod, alpha: number): PairwiseComparison {
  const { variance, df } = pairDifferenceVariance(set, i, j);
  const diff = set.means[i] - set.means[j];
  const se = Math.sqrt(variance);
  const k = set.means.length;
  let p: number;
  let halfWidth: number;
  if (method === "tukey") {
    p = studentizedRangeUpperP(Math.abs(diff) / (se / Math.SQRT2), k, df);
    halfWidth = (criticalValue("tukey", alpha, k, df) * se) / Math.SQRT2;
  } else {
    p = tTwoSidedP(diff / se, df);
    halfWidth = criticalValue("lsd", alpha, k, df) * se;
  }
  return {
    a: set.labels[i],
    b: set.labels[j],
    diff,
    se,
    df,
    lower: diff - halfWidth,
    upper: diff + halfWidth,
    p,
    significant: p < alpha,
  };
}

function meanSetOf(result: AnovaResult, term: string): MeanSet {
  const set = result.means[term];
  if (!set) {
    throw new Error(`the analysis has no means for "${term}"; it has ${Object.keys(result.means).join(", ")}`);
  }
  return set;
}

/** p-value of the term's own F test, when the table has one. */
function termFTestP(result: AnovaResult, term: string): number | null {
  return result.table.find((r) => r.source === term)?.p ?? null;
}

/** Pairwise comparisons and letters for one set of means; `fP` is the p-value protecting an LSD. */
function separateMeanSet(set: MeanSet, fP: number | null, options: ComparisonOptions): MeanSeparation {
  const method = options.method ?? "tukey";
  const alpha = options.alpha ?? 0.05;
  const protectedByF = method === "lsd" ? fP !== null && fP < alpha : null;
  const comparisons: PairwiseComparison[] = [];
  const k = set.means.length;
  /** differs[i·k + j], i < j: whether means i and j differ significantly. */
  const differs = new Uint8Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      const cmp = compareTwoMeans(set, i, j, method, alpha);
      if (protectedByF === false) cmp.significant = false;
      comparisons.push(cmp);
      differs[i * k + j] = cmp.significant ? 1 : 0;
    }
  }
  const groups = compactLetterDisplay(set.means, (i, j) => differs[i * k + j] === 1);
  const halfWidths = comparisons.map((c) => c.upper - c.diff);
  const uniform =
    comparisons.length > 0 &&
    comparisons.every((c, k) => Math.abs(halfWidths[k] - halfWidths[0]) <= 1e-9 * halfWidths[0] && c.df === comparisons[0].df);
  let note: string | null = null;
  if (protectedByF === false) {
    note = `the F test for ${set.term} is not significant at α = ${alpha}, so the protected LSD declares no differences`;
  } else if (method === "lsd" && fP === null) {
    note = `${set.term} has no F test of its own; the LSD comparisons are unprotected`;
  }
  return {
    term: set.term,
    method,
    alpha,
    means: set.labels.map((label, i) => ({ label, mean: set.means[i], se: set.se[i], n: set.n[i], group: groups[i] })),
    comparisons,
    criticalDifference: uniform ? halfWidths[0] : null,
    protectedByF,
    note,
  };
}

/**
 * Every pairwise difference of a term's least-squares means by one declared method, with a
 * compact letter display. Fisher's LSD is protected: when the term's F test is not significant
 * at α no difference is declared (Fisher 1935; Carmer & Swanson 1973, JASA 68:66–74).
 */
export function separateMeans(result: AnovaResult, term: string, options: ComparisonOptions = {}): MeanSeparation {
  return separateMeanSet(meanSetOf(result, term), termFTestP(result, term), options);
}

/** The means of a set at the given indices, with their variance matrices cut down to match. */
function sliceMeanSet(set: MeanSet, indices: readonly number[]): MeanSet {
  return {
    ...set,
    levels: indices.map((i) => set.levels[i]),
    labels: indices.map((i) => set.labels[i]),
    means: indices.map((i) => set.means[i]),
    se: indices.map((i) => set.se[i]),
    n: indices.map((i) => set.n[i]),
    variance: set.variance.map((v) => ({ ...v, matrix: indices.map((i) => indices.map((j) => v.matrix[i][j])) })),
  };
}

/**
 * Mean separation within each level of one factor of an interaction term — e.g. treatments
 * within each season of `treatment:season` — one family (and one set of letters) per level.
 * Split-plot strata are respected: treatments within a season get the combined SE with
 * Satterthwaite df. Keyed by the level of `by`.
 */
export function separateMeansWithin(
  result: AnovaResult,
  term: string,
  by: string,
  options: ComparisonOptions = {},
): Record<string, MeanSeparation> {
  const set = meanSetOf(result, term);
  const position = set.factors.indexOf(by);
  if (position < 0 || set.factors.length < 2) {
    throw new Error(`"${by}" is not one of the factors of the interaction ${term}`);
  }
  const byLevels = [...new Set(set.levels.map((l) => l[position]))];
  const fP = termFTestP(result, term);
  return Object.fromEntries(
    byLevels.map((level) => {
      const indices = set.levels.flatMap((l, i) => (l[position] === level ? [i] : []));
      return [level, separateMeanSet(sliceMeanSet(set, indices), fP, options)];
    }),
  );
}

/**
 * Each treatment minus the check, from the same method and family as `separateMeans` (Tukey's
 * adjustment counts every pair of means), so text, CIs and letters never disagree.
 */
export function compareWithCheck(
  result: AnovaResult,
  term: string,
  check: string,
  options: ComparisonOptions = {},
): PairwiseComparison[] {
  const set = meanSetOf(result, term);
  if (!set.labels.includes(check)) {
    throw new Error(`the check "${check}" is not a level of ${term}; levels are ${set.labels.join(", ")}`);
  }
  return separateMeans(result, term, options)
    .comparisons.filter((c) => c.a === check || c.b === check)
    .map((c) =>
      c.b === check
        ? c
        : { ...c, a: c.b, b: c.a, diff: -c.diff, lower: -c.upper, upper: -c.lower },
    );
}
