import { describe, expect, it } from "vitest";
import {
  checkOrthogonality,
  orthogonalPolynomialContrasts,
  rcbdAnova,
  rowOf,
  splitPlotAnova,
  tQuantile,
  testContrasts,
  treatmentVsCheckContrasts,
} from "../../../analysis/stats";
import { montgomeryEx41Rows, montgomerySplitPlot, rcbdFromRows } from "./published-data";

describe("orthogonal polynomial coefficients", () => {
  it("match Fisher & Yates (Statistical Tables, Table XXIII) for 3–6 equally spaced levels", () => {
    const coefficients = (k: number) => orthogonalPolynomialContrasts(k).map((c) => c.coefficients);
    expect(coefficients(3)).toEqual([[-1, 0, 1], [1, -2, 1]]); // Fisher & Yates: k = 3
    expect(coefficients(4)).toEqual([[-3, -1, 1, 3], [1, -1, -1, 1], [-1, 3, -3, 1]]); // Fisher & Yates: k = 4 (also DESIGN.md)
    expect(coefficients(5)).toEqual([
      [-2, -1, 0, 1, 2],
      [2, -1, -2, -1, 2],
      [-1, 2, 0, -2, 1],
      [1, -4, 6, -4, 1],
    ]); // Fisher & Yates: k = 5
    expect(coefficients(6)).toEqual([
      [-5, -3, -1, 1, 3, 5],
      [5, -1, -4, -4, -1, 5],
      [-5, 7, 4, -4, -7, 5],
      [1, -3, 2, 2, -3, 1],
      [-1, 5, -10, 10, -5, 1],
    ]); // Fisher & Yates: k = 6
    expect(orthogonalPolynomialContrasts(4).map((c) => c.name)).toEqual(["linear", "quadratic", "cubic"]);
  });

  it("form an orthogonal set", () => {
    expect(checkOrthogonality(orthogonalPolynomialContrasts(6)).orthogonal).toBe(true);
  });
});

describe("contrast tests", () => {
  const split = splitPlotAnova(montgomerySplitPlot, { block: "rep", main: ["method"], sub: ["temperature"] });

  it("a complete orthogonal set partitions the treatment SS (Montgomery split-plot: SS temperature 434.08)", () => {
    const results = testContrasts(split, "temperature", orthogonalPolynomialContrasts(4));
    const mse = rowOf(split.table, "residual").ms!;
    // SS(contrast) = F·MSE; the three single-df SS add to SS temperature.
    const ssSum = results.reduce((s, c) => s + c.f * mse, 0);
    expect(ssSum).toBeCloseTo(434.08, 2); // Montgomery, DAE split-plot: SS temperature 434.08
    for (const c of results) {
      expect(c.df).toBe(18); // Montgomery split-plot: error(b) 18 df
      expect(c.f).toBeCloseTo(c.t * c.t, 10);
    }
  });

  it("estimate, SE, t, p and CI by the textbook formulas (Montgomery, DAE Ex 4.1 values, independent check)", () => {
    const result = rcbdAnova(rcbdFromRows(montgomeryEx41Rows));
    const [c] = testContrasts(result, "treatment", [{ name: "1+2 vs 3+4", coefficients: [1, 1, -1, -1] }]);
    const means = montgomeryEx41Rows.map((r) => r.reduce((s, v) => s + v, 0) / 6);
    const mse = 109.886 / 15; // Montgomery, DAE Ex 4.1: SS error 109.886 on 15 df
    expect(c.estimate).toBeCloseTo(means[0] + means[1] - means[2] - means[3], 10);
    expect(c.se).toBeCloseTo(Math.sqrt((mse * 4) / 6), 3); // Var = MSE·Σc²/b
    expect(c.df).toBe(15);
    expect(c.t).toBeCloseTo(c.estimate / c.se, 12);
    const half = 2.131 * c.se; // standard tables: t0.975,15 = 2.131
    expect(c.lower).toBeCloseTo(c.estimate - half, 2);
    expect(c.upper).toBeCloseTo(c.estimate + half, 2);
    expect(c.p).toBeLessThan(0.05);
    expect(tQuantile(0.975, 15)).toBeCloseTo(2.131, 3); // standard tables: t0.975,15 = 2.131
  });

  it("refuses coefficients that do not sum to zero or do not match the treatments", () => {
    const result = rcbdAnova(rcbdFromRows(montgomeryEx41Rows));
    expect(() => testContrasts(result, "treatment", [{ name: "bad", coefficients: [1, 1, -1, 0] }])).toThrow(
      'contrast "bad": the coefficients sum to 1; a contrast\'s coefficients must sum to zero',
    );
    expect(() => testContrasts(result, "treatment", [{ name: "short", coefficients: [1, -1] }])).toThrow(
      'contrast "short" has 2 coefficients but there are 4 treatments',
    );
  });

  it("each-treatment-vs-check preset gives the same differences as the means", () => {
    const result = rcbdAnova(rcbdFromRows(montgomeryEx41Rows));
    const specs = treatmentVsCheckContrasts(result.means.treatment.labels, "T4");
    expect(specs.map((s) => s.name)).toEqual(["T1 vs T4", "T2 vs T4", "T3 vs T4"]);
    expect(specs[0].coefficients).toEqual([1, 0, 0, -1]);
    const tested = testContrasts(result, "treatment", specs);
    const m = result.means.treatment.means;
    tested.forEach((c, i) => expect(c.estimate).toBeCloseTo(m[i] - m[3], 12));
    // Vs-check contrasts share the check, so they are not orthogonal.
    expect(checkOrthogonality(specs).orthogonal).toBe(false);
  });

  it("orthogonality with unequal replication uses Σ c_i d_i / n_i", () => {
    const a = { name: "a", coefficients: [1, -1, 0] };
    const b = { name: "b", coefficients: [1, 1, -2] };
    expect(checkOrthogonality([a, b]).orthogonal).toBe(true);
    expect(checkOrthogonality([a, b], [2, 4, 4]).orthogonal).toBe(false); // 1/2 − 1/4 ≠ 0
  });
});
