import { describe, expect, it } from "vitest";
import {
  crossedTerm,
  designMatrix,
  factorFromLabels,
  fitLinearModel,
  isBalanced,
  leastSquares,
  splitPlotTerms,
  sumToZeroCode,
  toModelData,
  factorialTerms,
  type ModelData,
  type Term,
} from "../../../analysis/stats";
import { montgomeryEx41Rows, montgomeryEx51, montgomerySplitPlot, rcbdFromRows } from "./published-data";

/** Small deterministic generator (mulberry32) so the property tests are reproducible. */
function random(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function relativeDifference(a: number, b: number): number {
  return Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), 1e-300);
}

function rcbdData(rows: number[][]): ModelData {
  const plots = rcbdFromRows(rows).map((p) => ({ levels: { block: p.block, treatment: p.treatment }, value: p.value }));
  return toModelData(plots, ["block", "treatment"]);
}

const rcbdTerms = [crossedTerm("block"), crossedTerm("treatment")];

describe("factor coding and design matrices", () => {
  it("codes levels in order of first appearance", () => {
    const f = factorFromLabels("treatment", ["T2", "T1", "T2", "T3"]);
    expect(f.levels).toEqual(["T2", "T1", "T3"]);
    expect(f.codes).toEqual([0, 1, 0, 2]);
  });

  it("uses sum-to-zero codes whose columns sum to zero over the levels", () => {
    const codes = [0, 1, 2, 3].map((level) => sumToZeroCode(level, 4));
    expect(codes).toEqual([
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
      [-1, -1, -1],
    ]);
    for (let col = 0; col < 3; col++) expect(codes.reduce((s, row) => s + row[col], 0)).toBe(0);
  });

  it("builds interaction columns as products of main-effect columns", () => {
    const data = toModelData(montgomeryEx51, ["material", "temperature"]);
    const design = designMatrix(data, factorialTerms(["material", "temperature"]));
    // 1 + 2 + 2 + 4 columns for a 3 × 3 factorial.
    expect(design.rows[0].length).toBe(9);
    expect(design.columns["material:temperature"]).toEqual({ start: 5, end: 9 });
    for (const row of design.rows) {
      const [, a1, a2, b1, b2, ab11, ab12, ab21, ab22] = row;
      expect([ab11, ab12, ab21, ab22]).toEqual([a1 * b1, a1 * b2, a2 * b1, a2 * b2]);
    }
  });
});

describe("least squares by QR", () => {
  it("recovers an exact linear relation", () => {
    // Independent check: y = 2 + 3x exactly, so b = (2, 3) and RSS = 0.
    const rows = [0, 1, 2, 3, 4].map((x) => [1, x]);
    const fit = leastSquares(rows, rows.map(([, x]) => 2 + 3 * x));
    expect(fit.coefficients[0]).toBeCloseTo(2, 12);
    expect(fit.coefficients[1]).toBeCloseTo(3, 12);
    expect(fit.rss).toBeLessThan(1e-20);
    // Independent check: leverages sum to the rank (trace of the hat matrix).
    expect(fit.leverage.reduce((s, h) => s + h, 0)).toBeCloseTo(2, 12);
  });

  it("sets aside an aliased column instead of failing", () => {
    // Column 2 duplicates column 1: rank 2, and the fit equals the fit without it.
    const xs = [1, 2, 4, 7, 8];
    const y = [1.2, 1.9, 4.3, 6.8, 8.4];
    const withAlias = leastSquares(xs.map((x) => [1, x, 2 * x]), y);
    const without = leastSquares(xs.map((x) => [1, x]), y);
    expect(withAlias.rank).toBe(2);
    expect(withAlias.aliased).toEqual([false, false, true]);
    expect(withAlias.rss).toBeCloseTo(without.rss, 12);
  });
});

describe("closed form and QR agree on balanced data", () => {
  const designs: { name: string; data: ModelData; terms: Term[] }[] = [
    { name: "RCBD (Montgomery Ex 4.1)", data: rcbdData(montgomeryEx41Rows), terms: rcbdTerms },
    {
      name: "factorial (Montgomery Ex 5.1)",
      data: toModelData(montgomeryEx51, ["material", "temperature"]),
      terms: factorialTerms(["material", "temperature"]),
    },
    {
      name: "split-plot (Montgomery paper strength)",
      data: toModelData(montgomerySplitPlot, ["rep", "method", "temperature"]),
      terms: splitPlotTerms("rep", ["method"], ["temperature"]).terms,
    },
  ];

  for (const { name, data, terms } of designs) {
    it(`${name}: every SS, df, fitted value and residual to 1e-9 relative`, () => {
      expect(isBalanced(data, terms)).toBe(true);
      const closed = fitLinearModel(data, terms, "closed-form");
      const qr = fitLinearModel(data, terms, "least-squares");
      expect(closed.method).toBe("closed-form");
      expect(qr.method).toBe("least-squares");
      closed.termSums.forEach((t, k) => {
        expect(qr.termSums[k].df).toBe(t.df);
        expect(relativeDifference(qr.termSums[k].ss, t.ss)).toBeLessThan(1e-9);
      });
      expect(qr.residual.df).toBe(closed.residual.df);
      expect(relativeDifference(qr.residual.ss, closed.residual.ss)).toBeLessThan(1e-9);
      closed.fitted.forEach((v, i) => expect(relativeDifference(qr.fitted[i], v)).toBeLessThan(1e-9));
      closed.leverage.forEach((h, i) => expect(relativeDifference(qr.leverage[i], h)).toBeLessThan(1e-9));
    });
  }

  it("random balanced RCBDs: closed form = QR to 1e-9 relative (property, 20 draws)", () => {
    const next = random(20240501);
    for (let draw = 0; draw < 20; draw++) {
      const t = 2 + Math.floor(next() * 6);
      const b = 2 + Math.floor(next() * 5);
      const rows = Array.from({ length: t }, () => Array.from({ length: b }, () => 10 + 5 * next()));
      const data = rcbdData(rows);
      const closed = fitLinearModel(data, rcbdTerms, "closed-form");
      const qr = fitLinearModel(data, rcbdTerms, "least-squares");
      closed.termSums.forEach((s, k) => expect(relativeDifference(qr.termSums[k].ss, s.ss)).toBeLessThan(1e-9));
      expect(relativeDifference(qr.residual.ss, closed.residual.ss)).toBeLessThan(1e-9);
    }
  });
});

describe("sums of squares: invariances (randomized properties)", () => {
  const next = random(7);
  const rows = Array.from({ length: 5 }, () => Array.from({ length: 4 }, () => 20 + 10 * next()));

  for (const method of ["closed-form", "least-squares"] as const) {
    it(`${method}: components add to the total; row order, shifts and scaling behave`, () => {
      const data = rcbdData(rows);
      const fit = fitLinearModel(data, rcbdTerms, method);
      const sum = fit.termSums.reduce((s, t) => s + t.ss, 0) + fit.residual.ss;
      expect(relativeDifference(sum, fit.total.ss)).toBeLessThan(1e-10);

      // Reversing the row order changes nothing.
      const order = data.y.map((_, i) => data.y.length - 1 - i);
      const reversed: ModelData = {
        y: order.map((i) => data.y[i]),
        factors: Object.fromEntries(
          Object.entries(data.factors).map(([n, f]) => [n, factorFromLabels(n, order.map((i) => f.levels[f.codes[i]]))]),
        ),
        covariates: {},
      };
      const fitReversed = fitLinearModel(reversed, rcbdTerms, method);
      fit.termSums.forEach((t, k) => expect(relativeDifference(fitReversed.termSums[k].ss, t.ss)).toBeLessThan(1e-10));

      // Adding a constant changes no SS; scaling by k scales every SS by k².
      const shifted = fitLinearModel({ ...data, y: data.y.map((v) => v + 1000) }, rcbdTerms, method);
      const scaled = fitLinearModel({ ...data, y: data.y.map((v) => v * 3) }, rcbdTerms, method);
      fit.termSums.forEach((t, k) => {
        expect(relativeDifference(shifted.termSums[k].ss, t.ss)).toBeLessThan(1e-8);
        expect(relativeDifference(scaled.termSums[k].ss, 9 * t.ss)).toBeLessThan(1e-10);
      });
      expect(relativeDifference(scaled.residual.ss, 9 * fit.residual.ss)).toBeLessThan(1e-10);
    });
  }
});
