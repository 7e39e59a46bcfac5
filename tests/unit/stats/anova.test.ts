import { describe, expect, it } from "vitest";
import {
  factorialAnova,
  oneWayAnova,
  rcbdAnova,
  rowOf,
  splitPlotAnova,
  type AnovaResult,
  type LeveledPlot,
} from "../../../analysis/stats";
import {
  montgomeryEx41Rows,
  montgomeryEx51,
  montgomeryRungerEx135Rows,
  montgomerySplitPlot,
  rcbdFromRows,
} from "./published-data";

function row(result: AnovaResult, source: string) {
  return rowOf(result.table, source);
}

describe("RCBD", () => {
  const result = rcbdAnova(rcbdFromRows(montgomeryEx41Rows));

  it("reproduces Montgomery, DAE Example 4.1", () => {
    expect(result.method).toBe("closed-form");
    expect(row(result, "block").ss).toBeCloseTo(192.252, 3); // Montgomery, DAE Ex 4.1: SS blocks 192.252
    expect(row(result, "treatment").ss).toBeCloseTo(178.171, 3); // Montgomery, DAE Ex 4.1: SS treatment 178.171
    expect(row(result, "residual").ss).toBeCloseTo(109.886, 3); // Montgomery, DAE Ex 4.1: SS error 109.886
    expect(row(result, "treatment").df).toBe(3); // Montgomery, DAE Ex 4.1: a − 1 = 3
    expect(row(result, "block").df).toBe(5); // Montgomery, DAE Ex 4.1: b − 1 = 5
    expect(row(result, "residual").df).toBe(15); // Montgomery, DAE Ex 4.1: (a − 1)(b − 1) = 15
    expect(row(result, "treatment").f).toBeCloseTo(8.107, 3); // Montgomery, DAE Ex 4.1: F0 = 8.107
    expect(row(result, "treatment").p).toBeCloseTo(0.00192, 5); // Montgomery, DAE Ex 4.1: P = 0.00192
    expect(row(result, "treatment").errorTerm).toBe("residual");
    expect(row(result, "total").df).toBe(23); // Montgomery, DAE Ex 4.1: N − 1 = 23
  });

  it("reports grand mean, CV % and least-squares means with SE = √(MSE/b)", () => {
    // Independent check: means and CV computed directly from the table.
    const all = montgomeryEx41Rows.flat();
    const grand = all.reduce((s, v) => s + v, 0) / all.length;
    expect(result.grandMean).toBeCloseTo(grand, 10);
    const mse = 109.886 / 15; // Montgomery, DAE Ex 4.1: SS error 109.886 on 15 df
    expect(result.cvPercent).toBeCloseTo((Math.sqrt(mse) / grand) * 100, 3);
    const means = result.means.treatment;
    expect(means.labels).toEqual(["T1", "T2", "T3", "T4"]);
    montgomeryEx41Rows.forEach((r, i) => {
      expect(means.means[i]).toBeCloseTo(r.reduce((s, v) => s + v, 0) / 6, 10);
      expect(means.se[i]).toBeCloseTo(Math.sqrt(mse / 6), 4);
    });
  });

  it("reproduces Montgomery & Runger Example 13-5", () => {
    const fabric = rcbdAnova(rcbdFromRows(montgomeryRungerEx135Rows));
    expect(row(fabric, "treatment").ss).toBeCloseTo(18.044, 3); // Montgomery & Runger Ex 13-5: SS treatments 18.044
    expect(row(fabric, "block").ss).toBeCloseTo(6.693, 3); // Montgomery & Runger Ex 13-5: SS blocks 6.693
    expect(row(fabric, "residual").ss).toBeCloseTo(0.951, 3); // Montgomery & Runger Ex 13-5: SS error 0.951
    expect(row(fabric, "treatment").f).toBeCloseTo(75.89, 2); // Montgomery & Runger Ex 13-5: F0 = 75.89
  });

  it("says which plot is absent, duplicated or not a number", () => {
    const plots = rcbdFromRows(montgomeryEx41Rows);
    const withoutOne = plots.filter((p) => !(p.block === "3" && p.treatment === "T2"));
    expect(() => rcbdAnova(withoutOne)).toThrow("block 3 has no plot for treatment T2");
    expect(() => rcbdAnova([...plots, { block: "2", treatment: "T1", value: 1 }])).toThrow(
      "block 2 has 2 plots for treatment T1",
    );
    expect(() => rcbdAnova(plots.map((p, i) => (i === 0 ? { ...p, value: Number.NaN } : p)))).toThrow("is not a number");
    expect(() => rcbdAnova(plots.filter((p) => p.block === "1"))).toThrow("at least 2 levels of block");
    const t3Lost = plots.map((p) => (p.treatment === "T3" ? { ...p, value: null } : p));
    expect(() => rcbdAnova(t3Lost)).toThrow("treatment T3 has no observed value");
  });
});

describe("RCBD with one missing plot", () => {
  const rows: (number | null)[][] = montgomeryEx41Rows.map((r) => [...r]);
  rows[0][2] = null; // drop pressure 1 / batch 3 (98.2)
  const result = rcbdAnova(rcbdFromRows(rows));

  it("fits by least squares and reproduces the missing-plot estimate (DESIGN.md, Montgomery Ex 4.1 values)", () => {
    expect(result.method).toBe("least-squares");
    expect(result.missing).toHaveLength(1);
    expect(result.missing[0].levels).toEqual({ block: "3", treatment: "T1" });
    expect(result.missing[0].estimate).toBeCloseTo(91.513, 3); // DESIGN.md (Montgomery Ex 4.1 drop 98.2): x = 91.513

    // Independent check: the missing-plot formula x = (tT + bB − G)/((t − 1)(b − 1)) (Steel & Torrie 1980; Gomez & Gomez 1984).
    const t = 4;
    const b = 6;
    const observed = rows.flat().filter((v): v is number => v !== null);
    const T = rows[0].reduce<number>((s, v) => s + (v ?? 0), 0);
    const B = rows.reduce<number>((s, r) => s + (r[2] ?? 0), 0);
    const G = observed.reduce((s, v) => s + v, 0);
    expect(result.missing[0].estimate).toBeCloseTo((t * T + b * B - G) / ((t - 1) * (b - 1)), 10);
  });

  it("gives the bias-corrected treatment SS as the type II SS, residual df reduced by one", () => {
    expect(row(result, "residual").ss).toBeCloseTo(81.942, 3); // DESIGN.md (Montgomery Ex 4.1 drop 98.2): SS error 81.942
    expect(row(result, "residual").df).toBe(14); // DESIGN.md: 14 df
    expect(row(result, "treatment").ss).toBeCloseTo(136.996, 3); // DESIGN.md: adjusted SS treatment 136.996

    // Filling in x and analysing as complete data gives the (biased) SS treatment …
    const filled = rows.map((r) => r.map((v) => v ?? result.missing[0].estimate));
    const filledResult = rcbdAnova(rcbdFromRows(filled));
    expect(row(filledResult, "treatment").ss).toBeCloseTo(143.362, 3); // DESIGN.md: SS treatment filled 143.362
    // … and the bias [B − (t − 1)x]² / (t(t − 1)) (Steel & Torrie 1980) takes it to the adjusted SS.
    const B = rows.reduce<number>((s, r) => s + (r[2] ?? 0), 0);
    const bias = (B - 3 * result.missing[0].estimate) ** 2 / (4 * 3);
    expect(row(result, "treatment").ss).toBeCloseTo(row(filledResult, "treatment").ss - bias, 8);
  });

  it("gives least-squares means equal to the means with the estimate filled in", () => {
    // Independent check: with one missing plot the LS mean is the treatment mean with x in its place.
    const t1 = (rows[0].reduce<number>((s, v) => s + (v ?? 0), 0) + result.missing[0].estimate) / 6;
    expect(result.means.treatment.means[0]).toBeCloseTo(t1, 8);
    expect(result.means.treatment.n).toEqual([5, 6, 6, 6]);
  });

  it("does not depend on row order", () => {
    const shuffled = [...rcbdFromRows(rows)].reverse();
    const again = rcbdAnova(shuffled);
    expect(rowOf(again.table, "treatment").ss).toBeCloseTo(row(result, "treatment").ss, 9);
  });
});

describe("one-way ANOVA", () => {
  it("matches the RCBD treatment SS and pools block + error", () => {
    // Independent check: dropping blocks moves SS block into the residual (Montgomery, DAE Ex 4.1 values).
    const plots = rcbdFromRows(montgomeryEx41Rows).map(({ treatment, value }) => ({ treatment, value }));
    const result = oneWayAnova(plots);
    expect(row(result, "treatment").ss).toBeCloseTo(178.171, 3); // Montgomery, DAE Ex 4.1: SS treatment 178.171
    expect(row(result, "residual").ss).toBeCloseTo(192.252 + 109.886, 3); // Montgomery, DAE Ex 4.1: SS blocks + SS error
    expect(row(result, "residual").df).toBe(20); // Montgomery, DAE Ex 4.1: 5 block df + 15 error df
  });

  it("handles unequal replication through least squares", () => {
    // Independent check: brute-force between-group SS Σ n_i (ȳ_i − ȳ)².
    const groups = { A: [4.1, 5.0, 4.6], B: [6.2, 5.9], C: [3.3, 3.9, 4.0, 3.6] };
    const plots = Object.entries(groups).flatMap(([treatment, vs]) => vs.map((value) => ({ treatment, value })));
    const all = Object.values(groups).flat();
    const grand = all.reduce((s, v) => s + v, 0) / all.length;
    const between = Object.values(groups).reduce((s, vs) => {
      const m = vs.reduce((a, v) => a + v, 0) / vs.length;
      return s + vs.length * (m - grand) ** 2;
    }, 0);
    const result = oneWayAnova(plots);
    expect(result.method).toBe("least-squares");
    expect(row(result, "treatment").ss).toBeCloseTo(between, 10);
    expect(row(result, "residual").df).toBe(6); // N − t = 9 − 3
  });
});

describe("factorial", () => {
  it("reproduces Montgomery, DAE Example 5.1 (completely randomized 3 × 3)", () => {
    const result = factorialAnova(montgomeryEx51, { factors: ["material", "temperature"] });
    expect(row(result, "material").ss).toBeCloseTo(10683.72, 2); // Montgomery, DAE Ex 5.1: SS material 10683.72
    expect(row(result, "temperature").ss).toBeCloseTo(39118.72, 2); // Montgomery, DAE Ex 5.1: SS temperature 39118.72
    expect(row(result, "material:temperature").ss).toBeCloseTo(9613.78, 2); // Montgomery, DAE Ex 5.1: SS interaction 9613.78
    expect(row(result, "residual").ss).toBeCloseTo(18230.75, 2); // Montgomery, DAE Ex 5.1: SS error 18230.75
    expect(row(result, "residual").df).toBe(27); // Montgomery, DAE Ex 5.1: 27 df
    expect(Object.keys(result.means)).toEqual(["material", "temperature", "material:temperature"]);
    expect(result.means["material:temperature"].means[0]).toBeCloseTo((130 + 155 + 74 + 180) / 4, 10); // Montgomery Ex 5.1 cell (1, 15 °F)
  });

  it("in blocks: the replicates as blocks take their SS out of the residual", () => {
    // Independent check: with the 4 replicates used as blocks, SS residual = 18230.75 − SS blocks,
    // SS blocks = Σ_k 9·(ȳ_k − ȳ)² computed by brute force below.
    const blocked: LeveledPlot[] = montgomeryEx51.map((p, i) => ({ levels: { ...p.levels, block: String((i % 4) + 1) }, value: p.value }));
    const result = factorialAnova(blocked, { factors: ["material", "temperature"], block: "block" });
    const totals = [0, 0, 0, 0];
    blocked.forEach((p, i) => (totals[i % 4] += p.value!));
    const grand = totals.reduce((s, v) => s + v, 0) / 36;
    const ssBlocks = totals.reduce((s, v) => s + 9 * (v / 9 - grand) ** 2, 0);
    expect(row(result, "block").ss).toBeCloseTo(ssBlocks, 8);
    expect(row(result, "residual").ss).toBeCloseTo(18230.75 - ssBlocks, 2); // Montgomery, DAE Ex 5.1: SS error 18230.75
    expect(row(result, "residual").df).toBe(24); // 27 df of Montgomery Ex 5.1 less 3 for blocks
    expect(row(result, "material").ss).toBeCloseTo(10683.72, 2); // Montgomery, DAE Ex 5.1: SS material unchanged
  });

  it("takes three factors: every interaction, SS adding to the total", () => {
    // Independent check: 2 × 2 × 2 in 2 blocks, each effect's SS = (contrast total)²/N for ±1 columns.
    const values = [10, 12, 15, 11, 13, 18, 14, 20, 11, 13, 14, 12, 12, 19, 15, 21];
    const plots: LeveledPlot[] = values.map((value, i) => ({
      levels: { block: String(Math.floor(i / 8) + 1), A: String(i & 1), B: String((i >> 1) & 1), C: String((i >> 2) & 1) },
      value,
    }));
    const result = factorialAnova(plots, { factors: ["A", "B", "C"], block: "block" });
    expect(result.table.map((r) => r.source)).toEqual([
      "block", "A", "B", "C", "A:B", "A:C", "B:C", "A:B:C", "residual", "total",
    ]);
    const sign = (i: number, bit: number) => (((i >> bit) & 1) === 1 ? 1 : -1);
    const effectSs = (bits: number[]) => {
      const total = values.reduce((s, v, i) => s + v * bits.reduce((p, b) => p * sign(i, b), 1), 0);
      return (total * total) / values.length;
    };
    expect(row(result, "A").ss).toBeCloseTo(effectSs([0]), 10);
    expect(row(result, "B:C").ss).toBeCloseTo(effectSs([1, 2]), 10);
    expect(row(result, "A:B:C").ss).toBeCloseTo(effectSs([0, 1, 2]), 10);
    const sum = result.table.filter((r) => r.source !== "total").reduce((s, r) => s + r.ss, 0);
    expect(sum).toBeCloseTo(row(result, "total").ss, 8);
  });
});

describe("split-plot", () => {
  const result = splitPlotAnova(montgomerySplitPlot, { block: "rep", main: ["method"], sub: ["temperature"] });

  it("reproduces Montgomery, DAE split-plot example (paper tensile strength)", () => {
    expect(result.table.map((r) => r.source)).toEqual([
      "rep", "method", "rep:method", "temperature", "method:temperature", "residual", "total",
    ]);
    expect(row(result, "rep").ss).toBeCloseTo(77.56, 2); // Montgomery, DAE split-plot: SS replicates 77.56
    expect(row(result, "method").ss).toBeCloseTo(128.39, 2); // Montgomery, DAE split-plot: SS method 128.39
    expect(row(result, "rep:method").ss).toBeCloseTo(36.28, 2); // Montgomery, DAE split-plot: error(a) 36.28
    expect(row(result, "rep:method").df).toBe(4); // Montgomery, DAE split-plot: error(a) 4 df
    expect(row(result, "method").f).toBeCloseTo(7.08, 2); // Montgomery, DAE split-plot: F method 7.08
    expect(row(result, "method").errorTerm).toBe("rep:method");
    expect(row(result, "temperature").ss).toBeCloseTo(434.08, 2); // Montgomery, DAE split-plot: SS temperature 434.08
    expect(row(result, "method:temperature").ss).toBeCloseTo(75.17, 2); // Montgomery, DAE split-plot: SS interaction 75.17
    expect(row(result, "residual").ss).toBeCloseTo(71.5, 2); // Montgomery, DAE split-plot: error(b) 71.50
    expect(row(result, "residual").df).toBe(18); // Montgomery, DAE split-plot: error(b) 18 df
    expect(row(result, "temperature").f).toBeCloseTo(36.43, 2); // Montgomery, DAE split-plot: F temperature 36.43
    expect(row(result, "method:temperature").f).toBeCloseTo(3.15, 2); // Montgomery, DAE split-plot: F interaction 3.15
    expect(row(result, "temperature").errorTerm).toBe("residual");
  });

  it("gives SEs from the right stratum (Gomez & Gomez 1984 split-plot SE formulas, independent check)", () => {
    const ea = 36.2778 / 4; // Montgomery split-plot error(a) MS
    const eb = 71.5 / 18; // Montgomery split-plot error(b) MS
    const [r, b] = [3, 4];
    expect(result.means.method.se[0]).toBeCloseTo(Math.sqrt(ea / (r * b)), 3);
    expect(result.cvPercentMainPlot).toBeCloseTo((Math.sqrt(ea) / result.grandMean) * 100, 3);
    expect(result.cvPercent).toBeCloseTo((Math.sqrt(eb) / result.grandMean) * 100, 3);
    // Cell mean: Var = [E_a + (b − 1)E_b]/(rb).
    expect(result.means["method:temperature"].se[0]).toBeCloseTo(Math.sqrt((ea + (b - 1) * eb) / (r * b)), 3);
  });

  it("with a missing sub-plot: fits by least squares, residual df reduced, comparisons refused with a reason", () => {
    const plots = montgomerySplitPlot.map((p, i) => (i === 5 ? { ...p, value: null } : p));
    const missing = splitPlotAnova(plots, { block: "rep", main: ["method"], sub: ["temperature"] });
    expect(missing.method).toBe("least-squares");
    expect(row(missing, "residual").df).toBe(17); // Montgomery split-plot error(b) 18 df less one missing value
    expect(missing.missing[0].levels).toEqual({ rep: "1", method: "2", temperature: "225" });
    expect(missing.means.method.unavailableReason).toMatch(/mixed model/);
  });
});
