import type { AnovaResult, MeanSet } from "./anova-table";
import { tQuantile, tTwoSidedP } from "./distributions";
import { linearCombinationVariance } from "./satterthwaite";

/** A named contrast: one coefficient per mean of the term, in the term's level order. */
export interface ContrastSpec {
  name: string;
  coefficients: number[];
}

export interface ContrastResult {
  name: string;
  coefficients: number[];
  estimate: number;
  se: number;
  t: number;
  df: number;
  /** F on 1 and df degrees of freedom, t². */
  f: number;
  p: number;
  lower: number;
  upper: number;
}

/** Throws unless the coefficients match the means in number and sum to zero. */
export function checkContrast(spec: ContrastSpec, levelCount: number): void {
  const { name, coefficients } = spec;
  if (coefficients.length !== levelCount) {
    throw new Error(`contrast "${name}" has ${coefficients.length} coefficients but there are ${levelCount} treatments`);
  }
  if (coefficients.some((c) => !Number.isFinite(c))) throw new Error(`contrast "${name}" has a coefficient that is not a number`);
  const sum = coefficients.reduce((s, c) => s + c, 0);
  const scale = Math.max(...coefficients.map(Math.abs));
  if (scale === 0) throw new Error(`contrast "${name}" has every coefficient zero`);
  if (Math.abs(sum) > 1e-9 * scale) {
    throw new Error(`contrast "${name}": the coefficients sum to ${Number(sum.toPrecision(6))}; a contrast's coefficients must sum to zero`);
  }
}

/**
 * A contrast L = Σ c_i m_i of least-squares means: SE = √Var(L) from the error strata involved,
 * t = L/SE on the error df (Satterthwaite's when strata mix), F = t², two-sided p, and the
 * 100(1 − α) % CI L ± t_{1−α/2,df}·SE (Montgomery, DAE, §3.5.4; Steel & Torrie 1980, §8.4).
 */
export function testContrast(set: MeanSet, spec: ContrastSpec, alpha = 0.05): ContrastResult {
  checkContrast(spec, set.means.length);
  const c = spec.coefficients;
  const estimate = c.reduce((s, ci, i) => s + ci * set.means[i], 0);
  const { variance, df } = linearCombinationVariance(set, c);
  const se = Math.sqrt(variance);
  const t = estimate / se;
  const half = tQuantile(1 - alpha / 2, df) * se;
  return {
    name: spec.name,
    coefficients: [...c],
    estimate,
    se,
    t,
    df,
    f: t * t,
    p: tTwoSidedP(t, df),
    lower: estimate - half,
    upper: estimate + half,
  };
}

/** Every contrast of a set over one term of an analysis. */
export function testContrasts(result: AnovaResult, term: string, specs: readonly ContrastSpec[], alpha = 0.05): ContrastResult[] {
  const set = result.means[term];
  if (!set) throw new Error(`the analysis has no means for "${term}"`);
  return specs.map((spec) => testContrast(set, spec, alpha));
}

export interface OrthogonalityCheck {
  orthogonal: boolean;
  /** Σ c_i d_i / n_i for every pair of contrasts (zero when orthogonal). */
  pairs: { a: string; b: string; product: number }[];
}

/**
 * Whether the contrasts of a set are mutually orthogonal: Σ c_i d_i / n_i = 0 for each pair, with
 * replications n_i (all equal when omitted, giving Σ c_i d_i = 0) (Montgomery, DAE, §3.5.5).
 */
export function checkOrthogonality(specs: readonly ContrastSpec[], replications?: readonly number[]): OrthogonalityCheck {
  const pairs: OrthogonalityCheck["pairs"] = [];
  for (let a = 0; a < specs.length; a++) {
    for (let b = a + 1; b < specs.length; b++) {
      const c = specs[a].coefficients;
      const d = specs[b].coefficients;
      if (c.length !== d.length) throw new Error(`contrasts "${specs[a].name}" and "${specs[b].name}" have different lengths`);
      const product = c.reduce((s, ci, i) => s + (ci * d[i]) / (replications ? replications[i] : 1), 0);
      pairs.push({ a: specs[a].name, b: specs[b].name, product });
    }
  }
  const scale = (spec: ContrastSpec) => Math.sqrt(spec.coefficients.reduce((s, v) => s + v * v, 0));
  const orthogonal = pairs.every((p) => {
    const sa = scale(specs.find((s) => s.name === p.a)!);
    const sb = scale(specs.find((s) => s.name === p.b)!);
    return Math.abs(p.product) <= 1e-9 * sa * sb * (replications ? Math.max(...replications.map((n) => 1 / n)) : 1);
  });
  return { orthogonal, pairs };
}

const POLYNOMIAL_NAMES = ["linear", "quadratic", "cubic", "quartic", "quintic"];

function gcd(a: number, b: number): number {
  return b === 0 ? a : gcd(b, a % b);
}

/** Rescales a vector to the smallest whole numbers proportional to it. */
function toSmallestIntegers(v: readonly number[]): number[] {
  const smallest = Math.min(...v.filter((x) => Math.abs(x) > 1e-9).map(Math.abs));
  const ratio = v.map((x) => x / smallest);
  for (let m = 1; m <= 10_000; m++) {
    const scaled = ratio.map((x) => x * m);
    if (scaled.every((x) => Math.abs(x - Math.round(x)) < 1e-6)) {
      const ints = scaled.map(Math.round);
      const g = ints.reduce((acc, x) => gcd(acc, Math.abs(x)), 0);
      return ints.map((x) => x / g);
    }
  }
  return ratio;
}

/**
 * Orthogonal polynomial contrasts for k equally spaced levels (degrees 1 … min(k − 1, maxDegree)):
 * Gram–Schmidt orthogonalization of 1, x, x², … over x = 1 … k, scaled to the smallest whole
 * numbers, last coefficient positive — the values tabulated by Fisher & Yates (Statistical
 * Tables, Table XXIII), e.g. 4 levels: linear −3 −1 1 3, quadratic 1 −1 −1 1, cubic −1 3 −3 1.
 */
export function orthogonalPolynomialContrasts(levelCount: number, maxDegree = levelCount - 1): ContrastSpec[] {
  if (!Number.isInteger(levelCount) || levelCount < 3) {
    throw new Error("orthogonal polynomial contrasts need at least 3 equally spaced levels");
  }
  const x = Array.from({ length: levelCount }, (_, i) => i + 1);
  const basis: number[][] = [x.map(() => 1)];
  const out: ContrastSpec[] = [];
  for (let degree = 1; degree <= Math.min(levelCount - 1, maxDegree); degree++) {
    let v = x.map((xi) => xi ** degree);
    for (const q of basis) {
      const projection = v.reduce((s, vi, i) => s + vi * q[i], 0) / q.reduce((s, qi) => s + qi * qi, 0);
      v = v.map((vi, i) => vi - projection * q[i]);
    }
    basis.push(v);
    const coefficients = toSmallestIntegers(v);
    if (coefficients[coefficients.length - 1] < 0) coefficients.forEach((c, i) => (coefficients[i] = -c));
    out.push({ name: POLYNOMIAL_NAMES[degree - 1] ?? `degree ${degree}`, coefficients });
  }
  return out;
}

/** One contrast per treatment against the check: +1 for the treatment, −1 for the check. */
export function treatmentVsCheckContrasts(labels: readonly string[], check: string): ContrastSpec[] {
  const checkIndex = labels.indexOf(check);
  if (checkIndex < 0) throw new Error(`the check "${check}" is not among the treatments ${labels.join(", ")}`);
  return labels.flatMap((label, i) =>
    i === checkIndex
      ? []
      : [{ name: `${label} vs ${check}`, coefficients: labels.map((_, k) => (k === i ? 1 : k === checkIndex ? -1 : 0)) }],
  );
}
