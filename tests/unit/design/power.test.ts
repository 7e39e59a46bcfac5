import { describe, expect, it } from "vitest";
import jStat from "jstat";
import { blocksNeeded, minimumDetectableDifference, mseFromCv, rcbdErrorDf } from "../../../analysis/design";

describe("t quantiles from jstat against a t table", () => {
  it.each([
    // standard statistical tables (two-sided 5 % and one-sided 20 % columns)
    [0.975, 15, 2.131], // DESIGN.md check: t₀.₉₇₅,₁₅ = 2.131
    [0.8, 15, 0.866],
    [0.975, 25, 2.06],
    [0.8, 25, 0.856],
    [0.975, 30, 2.042],
    [0.8, 30, 0.854],
  ])("t(%f, %i df) = %f", (p, df, table) => {
    expect(jStat.studentt.inv(p, df)).toBeCloseTo(table, 3);
  });
});

describe("rcbdErrorDf and mseFromCv", () => {
  it("df = (t − 1)(r − 1)", () => {
    // RCBD ANOVA: 6 treatments, 4 blocks → 5 × 3 = 15 residual df
    expect(rcbdErrorDf(6, 4)).toBe(15);
    expect(() => rcbdErrorDf(6, 1)).toThrow(/at least 2 blocks/);
  });

  it("MSE from CV", () => {
    // CV % = √MSE / mean × 100 (DESIGN.md); CV 10 % at mean 100 → √MSE = 10 → MSE = 100
    expect(mseFromCv(10, 100)).toBeCloseTo(100, 10);
  });
});

describe("minimumDetectableDifference", () => {
  it("matches a hand computation from t-table values", () => {
    // DESIGN.md formula MDD = (t₁₋α/₂,df + t₁₋β,df)·√(2·MSE/r), written out by hand:
    // t = 6, r = 4 → df = 15; α = 0.05, power 0.80; MSE = 4
    // t₀.₉₇₅,₁₅ = 2.131, t₀.₈₀,₁₅ = 0.866 (t table); √(2·4/4) = √2 = 1.41421
    // MDD = (2.131 + 0.866) × 1.41421 = 2.997 × 1.41421 = 4.2384 (table values carry ±0.0005 each)
    const mdd = minimumDetectableDifference({ treatments: 6, blocks: 4, mse: 4 });
    expect(Math.abs(mdd - 4.2384)).toBeLessThan(0.002);
  });

  it("shrinks as blocks are added and grows with a stricter α", () => {
    const at = (blocks: number, alpha = 0.05) =>
      minimumDetectableDifference({ treatments: 6, blocks, mse: 100, alpha });
    expect(at(3)).toBeGreaterThan(at(4));
    expect(at(4)).toBeGreaterThan(at(8));
    expect(at(4, 0.01)).toBeGreaterThan(at(4, 0.05));
  });

  it("refuses impossible assumptions", () => {
    expect(() => minimumDetectableDifference({ treatments: 6, blocks: 4, mse: 0 })).toThrow(/MSE/);
    expect(() => minimumDetectableDifference({ treatments: 6, blocks: 4, mse: 1, power: 1 })).toThrow(/Power/);
  });
});

describe("blocksNeeded", () => {
  it("matches a hand computation: 7 blocks to detect 16 units with CV 10 % at mean 100", () => {
    // MSE = (0.10 × 100)² = 100; t = 6 treatments; α = 0.05, power 0.80. With t-table values:
    // r = 6: df 25, (2.060 + 0.856) × √(200/6) = 2.916 × 5.7735 = 16.84 > 16
    // r = 7: df 30, (2.042 + 0.854) × √(200/7) = 2.896 × 5.3452 = 15.48 ≤ 16  → 7 blocks
    expect(blocksNeeded({ treatments: 6, mse: mseFromCv(10, 100), targetDifference: 16 })).toBe(7);
  });

  it("returns null when more than maxBlocks would be needed", () => {
    expect(blocksNeeded({ treatments: 6, mse: 100, targetDifference: 0.5, maxBlocks: 20 })).toBeNull();
  });

  it("needs 2 blocks at least", () => {
    expect(blocksNeeded({ treatments: 6, mse: 1, targetDifference: 1000 })).toBe(2);
  });
});
