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
  const used = parts.filter((p) => p.variance !== 0);
  if (used.length === 0) return Number.NaN;
  const total = used.reduce((s, p) => s + p.variance, 0);
  return (total * total) / used.reduce((s, p) => s + (p.variance * p.variance) / p.df, 0);
}

/**
 * Σ_k MS_k·q_k over the error strata of a set, where q_k is the quadratic form of the combination
 * in stratum k and `scale` its size, with Satterthwaite df when more than one stratum contributes.
 */
function overStrata(set: MeanSet, quadratic: (matrix: number[][]) => { q: number; scale: number }): { variance: number; df: number } {
  if (set.unavailableReason) throw new Error(set.unavailableReason);
  const parts = set.variance.map((component) => {
    const { q, scale } = quadratic(component.matrix);
    // Rounding can leave a tiny non-zero share from a stratum the combination does not touch.
    return { variance: Math.abs(q) <= 1e-12 * scale ? 0 : component.ms * q, df: component.df };
  });
  return { variance: parts.reduce((s, p) => s + p.variance, 0), df: satterthwaiteDf(parts) };
}

/**
 * Variance of c'm for a set of least-squares means, Σ_k MS_k·c'M_k c over its error strata,
 * with Satterthwaite df when more than one stratum contributes.
 */
export function linearCombinationVariance(set: MeanSet, c: readonly number[]): { variance: number; df: number } {
  const nonzero = c.flatMap((v, i) => (v === 0 ? [] : [i]));
  return overStrata(set, (matrix) => {
    let q = 0;
    let scale = 0;
    for (const i of nonzero) {
      scale += Math.abs(matrix[i][i]) * c[i] * c[i];
      for (const j of nonzero) q += c[i] * matrix[i][j] * c[j];
    }
    return { q, scale };
  });
}

/**
 * Variance of the difference m_i − m_j: Σ_k MS_k·(M_ii − M_ij − M_ji + M_jj), the same as
 * `linearCombinationVariance` with c = e_i − e_j without building c — the pairwise comparisons of
 * a many-treatment trial ask for it thousands of times.
 */
export function pairDifferenceVariance(set: MeanSet, i: number, j: number): { variance: number; df: number } {
  const lo = Math.min(i, j);
  const hi = Math.max(i, j);
  return overStrata(set, (matrix) => ({
    q: matrix[lo][lo] - matrix[lo][hi] - matrix[hi][lo] + matrix[hi][hi],
    scale: Math.abs(matrix[lo][lo]) + Math.abs(matrix[hi][hi]),
  }));
}
