import { describe, expect, it } from "vitest";
import {
  brownForsythe,
  normalQqPoints,
  rcbdAnova,
  residualDiagnostics,
  shapiroWilk,
} from "../../../analysis/stats";
import { montgomeryEx41Rows, rcbdFromRows } from "./published-data";

describe("Shapiro–Wilk (Royston 1995, AS R94)", () => {
  it("reproduces the weights example of Shapiro & Wilk 1965", () => {
    const weights = [148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236];
    const { w, p } = shapiroWilk(weights);
    expect(w).toBeCloseTo(0.79, 2); // Shapiro & Wilk 1965, Biometrika 52:591–611, weights of 11 men: W = 0.79 (from memory)
    expect(w).toBeCloseTo(0.788815, 5); // SciPy 1.17 scipy.stats.shapiro (AS R94), computed for this test: W = 0.788815
    expect(p).toBeCloseTo(0.0067038, 6); // SciPy 1.17 scipy.stats.shapiro: p = 0.0067038
  });

  it("uses the exact n = 3 distribution", () => {
    // Independent check: for n = 3, W = (x3 − x1)²/(2·SS) and p = (6/π)(asin √W − π/3) (Shapiro & Wilk 1965).
    const { w, p } = shapiroWilk([1, 2, 4]);
    const ss = [1, 2, 4].reduce((s, v) => s + (v - 7 / 3) ** 2, 0);
    expect(w).toBeCloseTo(9 / (2 * ss), 12);
    expect(p).toBeCloseTo((6 / Math.PI) * (Math.asin(Math.sqrt(w)) - Math.PI / 3), 12);
    expect(p).toBeCloseTo(0.636887, 5); // SciPy 1.17 scipy.stats.shapiro([1, 2, 4]): p = 0.636887
  });

  it("covers the small-n (4–11) and large-n (≥ 12) branches", () => {
    const five = shapiroWilk([2.1, 3.4, 1.9, 5.6, 4.4]);
    expect(five.w).toBeCloseTo(0.932085, 5); // SciPy 1.17 scipy.stats.shapiro: W = 0.932085
    expect(five.p).toBeCloseTo(0.610656, 5); // SciPy 1.17 scipy.stats.shapiro: p = 0.610656
    const thirteen = shapiroWilk([2.1, 3.4, 1.9, 5.6, 4.4, 7.7, 2.2, 3.0, 9.1, 4.5, 3.3, 2.8, 6.1]);
    expect(thirteen.w).toBeCloseTo(0.898532, 5); // SciPy 1.17 scipy.stats.shapiro: W = 0.898532
    expect(thirteen.p).toBeCloseTo(0.127667, 5); // SciPy 1.17 scipy.stats.shapiro: p = 0.127667
    const skewed = shapiroWilk(Array.from({ length: 30 }, (_, i) => Math.exp(i / 10)));
    expect(skewed.w).toBeCloseTo(0.868203, 5); // SciPy 1.17 scipy.stats.shapiro(exp(0:29/10)): W = 0.868203
    expect(skewed.p).toBeCloseTo(0.00152823, 7); // SciPy 1.17 scipy.stats.shapiro: p = 0.00152823
  });

  it("is unchanged by location and scale, and refuses constant data", () => {
    const x = [2.1, 3.4, 1.9, 5.6, 4.4, 7.7, 2.2];
    const a = shapiroWilk(x);
    const b = shapiroWilk(x.map((v) => 10 - 3 * v));
    expect(b.w).toBeCloseTo(a.w, 12);
    expect(() => shapiroWilk([5, 5, 5, 5])).toThrow("not all equal");
    expect(() => shapiroWilk([1, 2])).toThrow("at least 3");
  });
});

describe("Brown–Forsythe", () => {
  it("is Levene's test centred at the median", () => {
    const result = brownForsythe([[1, 2, 3, 4, 10], [2, 2.5, 3, 3.1], [5, 9, 1, 7, 3, 2]]);
    expect(result.f).toBeCloseTo(1.6325877, 6); // SciPy 1.17 scipy.stats.levene(center="median"): W = 1.6325877
    expect(result.p).toBeCloseTo(0.2359808, 6); // SciPy 1.17 scipy.stats.levene(center="median"): p = 0.2359808
    expect([result.df1, result.df2]).toEqual([2, 12]);
  });
});

describe("normal Q–Q coordinates", () => {
  it("pair sorted values with Blom scores, symmetric about zero", () => {
    const qq = normalQqPoints([3, 1, 2]);
    expect(qq.map((p) => p.sample)).toEqual([1, 2, 3]);
    expect(qq[1].theoretical).toBeCloseTo(0, 12);
    expect(qq[0].theoretical).toBeCloseTo(-qq[2].theoretical, 12);
    // Independent check: Φ⁻¹((3 − 3/8)/(3 + 1/4)) = Φ⁻¹(0.807692) ≈ 0.8694 (standard normal table).
    expect(qq[2].theoretical).toBeCloseTo(0.8694, 3);
  });
});

describe("residual diagnostics of an analysis", () => {
  it("RCBD (Montgomery, DAE Ex 4.1): residuals y − ȳi. − ȳ.j + ȳ.., leverage (t + b − 1)/(tb)", () => {
    const result = rcbdAnova(rcbdFromRows(montgomeryEx41Rows));
    const d = residualDiagnostics(result);
    const rows = montgomeryEx41Rows;
    const grand = rows.flat().reduce((s, v) => s + v, 0) / 24;
    const trt = rows.map((r) => r.reduce((s, v) => s + v, 0) / 6);
    const blk = rows[0].map((_, j) => rows.reduce((s, r) => s + r[j], 0) / 4);
    const mse = 109.886 / 15; // Montgomery, DAE Ex 4.1: SS error 109.886 on 15 df
    const h = (4 + 6 - 1) / 24;
    for (const row of d.rows) {
      const i = Number(row.levels.treatment.slice(1)) - 1;
      const j = Number(row.levels.block) - 1;
      const e = rows[i][j] - trt[i] - blk[j] + grand;
      expect(row.residual).toBeCloseTo(e, 10);
      expect(row.fitted).toBeCloseTo(rows[i][j] - e, 10);
      expect(row.studentized).toBeCloseTo(e / Math.sqrt(mse * (1 - h)), 3);
      expect(row.flagged).toBe(false);
    }
    expect(d.qq).toHaveLength(24);
    expect(d.shapiroWilk.w).toBeCloseTo(0.956311, 5); // SciPy 1.17 scipy.stats.shapiro on these 24 residuals: W = 0.956311
    expect(d.brownForsythe.df1).toBe(3);
  });

  it("flags a plot whose studentized residual exceeds 3", () => {
    const rows = montgomeryEx41Rows.map((r) => [...r]);
    rows[2][4] = 120; // a recording slip: 88.0 typed as 120
    const d = residualDiagnostics(rcbdAnova(rcbdFromRows(rows)));
    const flagged = d.rows.filter((r) => r.flagged);
    expect(flagged.map((r) => r.levels)).toEqual([{ block: "5", treatment: "T3" }]);
  });
});
