import type { MeanSet } from "./anova-table";

/** One mean square's share of a variance: its contribution v_k = a_k·MS_k and its df. */
export interface VariancePart {
  variance: number;
  df: number;
}

/**
 * Satterthwaite's approximate degrees of freedom for a sum of independent mean-square terms:
 * ν = (Σ v_k)² / Σ (v_k² / ν_k) (Satterthwaite 1946, Biometrics Bull. 2:110–114).
 * Parts that contribute nothing are ignored, so one part returns its own df.
 */
export function satterthwaiteDf(parts: readonly VariancePart[]): number {
  let total = 0;
  let weighted = 0;
  let used = 0;
  for (let k = 0; k < parts.length; k++) {
    const { variance, df } = parts[k];
    if (variance === 0) continue;
    total += variance;
    weighted += (variance * variance) / df;
    used += 1;
  }
  return used === 0 ? Number.NaN : (total * total) / weighted;
}

/**
 * Stratum k's share MS_k·q_k of a variance, where q_k is the quadratic form of the combination in
 * that stratum and `scale` its size. Rounding can leave a tiny non-zero share from a stratum the
 * combination does not touch; that counts as none.
 */
function stratumShare(ms: number, q: number, scale: number): number {
  return Math.abs(q) <= 1e-12 * scale ? 0 : ms * q;
}

/** Σ of the strata's shares, with Satterthwaite df when more than one contributes. */
function overStrata(parts: readonly VariancePart[]): { variance: number; df: number } {
  let variance = 0;
  for (let k = 0; k < parts.length; k++) variance += parts[k].variance;
  return { variance, df: satterthwaiteDf(parts) };
}

/**
 * Variance of c'm for a set of least-squares means, Σ_k MS_k·c'M_k c over its error strata,
 * with Satterthwaite df when more than one stratum contributes.
 */
export function linearCombinationVariance(set: MeanSet, c: readonly number[]): { variance: number; df: number } {
  if (set.unavailableReason) throw new Error(set.unavailableReason);
  const nonzero = c.flatMap((v, i) => (v === 0 ? [] : [i]));
  const parts = set.variance.map(({ matrix, ms, df }) => {
    let q = 0;
    let scale = 0;
    for (const i of nonzero) {
      scale += Math.abs(matrix[i][i]) * c[i] * c[i];
      for (const j of nonzero) q += c[i] * matrix[i][j] * c[j];
    }
    return { variance: stratumShare(ms, q, scale), df };
  });
  return overStrata(parts);
}

/**
 * Variance of the difference m_i − m_j: Σ_k MS_k·(M_ii − M_ij − M_ji + M_jj), the same as
 * `linearCombinationVariance` with c = e_i − e_j without building c — the pairwise comparisons of
 * a many-treatment trial ask for it thousands of times, so it is written as plain loops.
 */
export function pairDifferenceVariance(set: MeanSet, i: number, j: number): { variance: number; df: number } {
  if (set.unavailableReason) throw new Error(set.unavailableReason);
  const lo = Math.min(i, j);
  const hi = Math.max(i, j);
  const parts: VariancePart[] = [];
  for (let k = 0; k < set.variance.length; k++) {
    const { matrix, ms, df } = set.variance[k];
    const q = matrix[lo][lo] - matrix[lo][hi] - matrix[hi][lo] + matrix[hi][hi];
    parts.push({ variance: stratumShare(ms, q, Math.abs(matrix[lo][lo]) + Math.abs(matrix[hi][hi])), df });
  }
  return overStrata(parts);
}
