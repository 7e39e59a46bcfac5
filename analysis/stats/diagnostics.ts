import { mean, median } from "simple-statistics";
import { rowOf, type AnovaResult } from "./anova-table";
import { fUpperTailP, normalQuantile, normalUpperTailP } from "./distributions";

/**
 * Internally studentized residuals r_i = e_i / (s·√(1 − h_ii)), s² the residual mean square and
 * h_ii the leverage (Cook & Weisberg 1982, Residuals and Influence in Regression, §2.2).
 * A point with h_ii = 1 has no studentized residual (NaN).
 */
export function studentizedResiduals(residuals: readonly number[], leverage: readonly number[], residualMs: number): number[] {
  const s = Math.sqrt(residualMs);
  return residuals.map((e, i) => (leverage[i] >= 1 - 1e-10 ? Number.NaN : e / (s * Math.sqrt(1 - leverage[i]))));
}

export interface FTest {
  f: number;
  df1: number;
  df2: number;
  p: number;
}

/**
 * Brown–Forsythe test of equal variances: a one-way ANOVA F on z_ij = |y_ij − median_i|
 * (Brown & Forsythe 1974, JASA 69:364–367; Levene's test with the median as centre).
 */
export function brownForsythe(groups: readonly (readonly number[])[]): FTest {
  const used = groups.filter((g) => g.length > 0);
  if (used.length < 2) throw new Error("the Brown–Forsythe test needs at least two groups");
  const z = used.map((g) => {
    const m = median([...g]);
    return g.map((v) => Math.abs(v - m));
  });
  const all = z.flat();
  const n = all.length;
  const k = z.length;
  if (n <= k) throw new Error("the Brown–Forsythe test needs more values than groups");
  const grand = mean(all);
  const between = z.reduce((s, g) => s + g.length * (mean(g) - grand) ** 2, 0);
  const within = z.reduce((s, g) => {
    const m = mean(g);
    return s + g.reduce((a, v) => a + (v - m) ** 2, 0);
  }, 0);
  const f = (between / (k - 1)) / (within / (n - k));
  return { f, df1: k - 1, df2: n - k, p: fUpperTailP(f, k - 1, n - k) };
}

/** Evaluates c[0] + c[1]x + c[2]x² + … (the `poly` helper of algorithm AS R94). */
function polynomial(c: readonly number[], x: number): number {
  return c.reduce((s, ci, i) => s + ci * x ** i, 0);
}

export interface ShapiroWilkResult {
  w: number;
  p: number;
}

/**
 * Shapiro–Wilk W and its p-value by Royston's algorithm AS R94 (Royston 1995, Appl. Stat.
 * 44:547–551): approximate coefficients a_i from normal scores m_i = Φ⁻¹((i − 3/8)/(n + 1/4)),
 * W = (Σ a_i x_(i))² / Σ(x_i − x̄)², p from a normalizing transformation of 1 − W
 * (exact for n = 3). Valid for 3 ≤ n ≤ 5000.
 */
export function shapiroWilk(values: readonly number[]): ShapiroWilkResult {
  const x = [...values].sort((a, b) => a - b);
  const n = x.length;
  if (n < 3) throw new Error("the Shapiro–Wilk test needs at least 3 values");
  if (n > 5000) throw new Error("the Shapiro–Wilk test (Royston 1995) is valid for at most 5000 values");
  if (x[n - 1] - x[0] < 1e-19 * Math.max(1, Math.abs(x[0]))) throw new Error("the Shapiro–Wilk test needs values that are not all equal");

  const half = Math.floor(n / 2);
  const a = new Array<number>(half).fill(0); // a[i] pairs with x_(n−i) − x_(i+1)
  if (n === 3) {
    a[0] = Math.SQRT1_2;
  } else {
    const m = Array.from({ length: half }, (_, i) => normalQuantile((i + 1 - 0.375) / (n + 0.25)));
    const summ2 = 2 * m.reduce((s, v) => s + v * v, 0);
    const ssumm2 = Math.sqrt(summ2);
    const rsn = 1 / Math.sqrt(n);
    const a1 = polynomial([0, 0.221157, -0.147981, -2.07119, 4.434685, -2.706056], rsn) - m[0] / ssumm2;
    let first: number;
    let fac: number;
    if (n > 5) {
      const a2 = -m[1] / ssumm2 + polynomial([0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633], rsn);
      fac = Math.sqrt((summ2 - 2 * m[0] ** 2 - 2 * m[1] ** 2) / (1 - 2 * a1 ** 2 - 2 * a2 ** 2));
      a[1] = a2;
      first = 2;
    } else {
      fac = Math.sqrt((summ2 - 2 * m[0] ** 2) / (1 - 2 * a1 ** 2));
      first = 1;
    }
    a[0] = a1;
    for (let i = first; i < half; i++) a[i] = -m[i] / fac;
  }

  const xbar = mean(x);
  const ss = x.reduce((s, v) => s + (v - xbar) ** 2, 0);
  const numerator = a.reduce((s, ai, i) => s + ai * (x[n - 1 - i] - x[i]), 0);
  const w = Math.min(1, (numerator * numerator) / ss);

  if (n === 3) {
    // Exact: p = (6/π)(asin √W − asin √(3/4)).
    const p = (6 / Math.PI) * (Math.asin(Math.sqrt(w)) - Math.PI / 3);
    return { w, p: Math.max(0, Math.min(1, p)) };
  }
  const w1 = Math.log(1 - w);
  if (n <= 11) {
    const gamma = polynomial([-2.273, 0.459], n);
    if (w1 >= gamma) return { w, p: 1e-99 };
    const y = -Math.log(gamma - w1);
    const mu = polynomial([0.544, -0.39978, 0.025054, -6.714e-4], n);
    const sigma = Math.exp(polynomial([1.3822, -0.77857, 0.062767, -0.0020322], n));
    return { w, p: normalUpperTailP(y, mu, sigma) };
  }
  const ln = Math.log(n);
  const mu = polynomial([-1.5861, -0.31082, -0.083751, 0.0038915], ln);
  const sigma = Math.exp(polynomial([-0.4803, -0.082676, 0.0030302], ln));
  return { w, p: normalUpperTailP(w1, mu, sigma) };
}

export interface QqPoint {
  theoretical: number;
  sample: number;
}

/**
 * Normal Q–Q coordinates: the sorted values against Blom's normal scores
 * Φ⁻¹((i − 3/8)/(n + 1/4)) (Blom 1958, Statistical Estimates and Transformed Beta-Variables).
 */
export function normalQqPoints(values: readonly number[]): QqPoint[] {
  const sorted = [...values].sort((a, b) => a - b);
  const n = sorted.length;
  return sorted.map((sample, i) => ({ theoretical: normalQuantile((i + 1 - 0.375) / (n + 0.25)), sample }));
}

export interface ResidualRow {
  /** Index of the observation in the analysed plots. */
  index: number;
  levels: Record<string, string>;
  observed: number;
  fitted: number;
  residual: number;
  studentized: number;
  /** |studentized| > 3: worth a look for a recording error or an unusual plot. */
  flagged: boolean;
}

export interface ResidualDiagnostics {
  rows: ResidualRow[];
  /** Residuals grouped by the treatment combination (see `residualDiagnostics`). */
  brownForsythe: FTest;
  shapiroWilk: ShapiroWilkResult;
  /** Q–Q coordinates of the residuals. */
  qq: QqPoint[];
}

/** The treatment term with the most factors, i.e. the finest treatment combination. */
function finestTreatmentFactors(result: AnovaResult): string[] {
  return Object.values(result.means).reduce<string[]>((best, set) => (set.factors.length > best.length ? set.factors : best), []);
}

/**
 * Residual checks of an analysis: residuals vs fitted, studentized residuals (|r| > 3 flagged),
 * Brown–Forsythe on the residuals grouped by treatment combination (for a one-way layout this is
 * the classical test on the data), Shapiro–Wilk on the residuals, and normal Q–Q coordinates.
 */
export function residualDiagnostics(result: AnovaResult, groupFactors: readonly string[] = finestTreatmentFactors(result)): ResidualDiagnostics {
  const { fit } = result;
  const ms = rowOf(result.table, "residual").ms ?? Number.NaN;
  const studentized = studentizedResiduals(fit.residuals, fit.leverage, ms);
  const factorNames = Object.keys(fit.data.factors);
  const rows = fit.observed.map((index, k) => ({
    index,
    levels: Object.fromEntries(factorNames.map((f) => [f, fit.data.factors[f].levels[fit.data.factors[f].codes[index]]])),
    observed: fit.data.y[index],
    fitted: fit.fitted[k],
    residual: fit.residuals[k],
    studentized: studentized[k],
    flagged: Math.abs(studentized[k]) > 3,
  }));
  const groups = new Map<string, number[]>();
  for (const row of rows) {
    const key = groupFactors.map((f) => row.levels[f]).join(":");
    groups.set(key, [...(groups.get(key) ?? []), row.residual]);
  }
  return {
    rows,
    brownForsythe: brownForsythe([...groups.values()]),
    shapiroWilk: shapiroWilk(fit.residuals),
    qq: normalQqPoints(fit.residuals),
  };
}
