import jStat from "jstat";
import { studentizedRangeQuantileTabulated, studentizedRangeUpperPTabulated } from "./studentized-range-table";

// Thin, named wrappers over jstat so every caller reads in the trade's terms.
// No distribution is re-implemented here.

/**
 * Upper-tail probability P(F > f) for F(df1, df2), the p-value of an ANOVA F test.
 * Computed as I_x(df2/2, df1/2) with x = df2/(df2 + df1·f) (Abramowitz & Stegun 26.6.2)
 * so small p-values keep their precision instead of being 1 − (a number near 1).
 */
export function fUpperTailP(f: number, df1: number, df2: number): number {
  if (Number.isNaN(f) || df1 <= 0 || df2 <= 0) return Number.NaN;
  if (f === Number.POSITIVE_INFINITY) return 0;
  if (f <= 0) return 1;
  return jStat.ibeta(df2 / (df2 + df1 * f), df2 / 2, df1 / 2);
}

/**
 * Two-sided p-value 2·P(T > |t|) for Student's t with df degrees of freedom,
 * as I_x(df/2, 1/2) with x = df/(df + t²) (Abramowitz & Stegun 26.7.1).
 */
export function tTwoSidedP(t: number, df: number): number {
  if (Number.isNaN(t) || !(df > 0)) return Number.NaN;
  if (!Number.isFinite(t)) return 0;
  return jStat.ibeta(df / (df + t * t), df / 2, 0.5);
}

/** Quantile t(p, df) of Student's t, e.g. tQuantile(0.975, 15) = 2.131. */
export function tQuantile(p: number, df: number): number {
  return jStat.studentt.inv(p, df);
}

/** Quantile F(p; df1, df2) of the F distribution, e.g. fQuantile(0.95, 3, 15) = 3.287. */
export function fQuantile(p: number, df1: number, df2: number): number {
  return jStat.centralF.inv(p, df1, df2);
}

/**
 * Upper-tail probability of the studentized range, P(Q > q) for nMeans means and df
 * error degrees of freedom (jstat's port of R's ptukey, Copenhaver & Holland 1988), read from a
 * cached table of jstat's values (see studentized-range-table.ts): a direct call costs about
 * half a millisecond, and a trial asks for thousands.
 */
export function studentizedRangeUpperP(q: number, nMeans: number, df: number): number {
  if (!Number.isFinite(q)) return Number.NaN;
  return studentizedRangeUpperPTabulated(q, nMeans, df);
}

/**
 * Quantile q(p; nMeans, df) of the studentized range, e.g. q(0.95; 3, 12) = 3.773, by inverting
 * the same table of jstat's CDF that `studentizedRangeUpperP` reads, so Tukey CIs and p-values agree.
 */
export function studentizedRangeQuantile(p: number, nMeans: number, df: number): number {
  return studentizedRangeQuantileTabulated(p, nMeans, df);
}

/** Standard normal quantile Φ⁻¹(p). */
export function normalQuantile(p: number): number {
  return jStat.normal.inv(p, 0, 1);
}

/** Upper-tail probability P(Z > z) of a normal distribution with the given mean and SD. */
export function normalUpperTailP(z: number, mean = 0, sd = 1): number {
  return 1 - jStat.normal.cdf(z, mean, sd);
}
