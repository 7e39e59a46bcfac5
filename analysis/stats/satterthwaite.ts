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
 * Variance of c'm for a set of least-squares means, Σ_k MS_k·c'M_k c over its error strata,
 * with Satterthwaite df when more than one stratum contributes.
 */
export function linearCombinationVariance(set: MeanSet, c: readonly number[]): { variance: number; df: number } {
  if (set.unavailableReason) throw new Error(set.unavailableReason);
  const nonzero = c.flatMap((v, i) => (v === 0 ? [] : [i]));
  const parts = set.variance.map((component) => {
    let q = 0;
    let scale = 0;
    for (const i of nonzero) {
      scale += Math.abs(component.matrix[i][i]) * c[i] * c[i];
      for (const j of nonzero) q += c[i] * component.matrix[i][j] * c[j];
    }
    // Rounding can leave a tiny non-zero share from a stratum the combination does not touch.
    return { variance: Math.abs(q) <= 1e-12 * scale ? 0 : component.ms * q, df: component.df };
  });
  return { variance: parts.reduce((s, p) => s + p.variance, 0), df: satterthwaiteDf(parts) };
}
