// Contrasts over treatment codes: validation, presets, orthogonality and tests on an analysis.
import { describe, expect, it } from "vitest";
import { fitResults, type PlotObservation, type ResultsRequest } from "../../analysis/results";
import { tQuantile } from "../../analysis/stats";
import { contrastPresets, contrastProblem, nonOrthogonalPairs, testTreatmentContrasts } from "../../analysis/treatment-contrasts";

// Montgomery & Runger, Applied Statistics and Probability for Engineers, Example 13-5:
// 4 chemicals (treatments) × 5 fabric samples (blocks); SS error 0.951 on 12 df.
const ex135 = [
  [1.3, 1.6, 0.5, 1.2, 1.1],
  [2.2, 2.4, 0.4, 2.0, 1.8],
  [1.8, 1.7, 0.6, 1.5, 1.3],
  [3.9, 4.4, 2.0, 4.1, 3.4],
];
const treatments = ["C1", "C2", "C3", "C4"].map((code, i) => ({ code, name: `Chemical ${i + 1}`, isCheck: i === 0 }));
const observations: PlotObservation[] = ex135.flatMap((row, t) =>
  row.map((value, b) => ({
    plotNumber: (b + 1) * 100 + t + 1,
    block: b + 1,
    treatment: treatments[t].code,
    season: "S1",
    seasonOrder: 1,
    isBaseline: false,
    yearsFromBaseline: 1,
    value,
    excluded: false,
  })),
);
const request: ResultsRequest = { design: "rcbd", treatments, model: "per_season", method: "tukey", alpha: 0.05 };

describe("contrastProblem", () => {
  it("accepts coefficients that sum to zero", () => {
    expect(contrastProblem({ C1: 1, C2: -1, C3: 0, C4: 0 })).toBeNull();
    expect(contrastProblem({ C1: 3, C2: -1, C3: -1, C4: -1 })).toBeNull();
    expect(contrastProblem({ C1: 0.1, C2: 0.2, C3: -0.3 })).toBeNull(); // floating-point sum 5.6e-17
  });
  it("says what the sum is when it is not zero", () => {
    expect(contrastProblem({ C1: 1, C2: -0.5 })).toBe(
      "The coefficients sum to 0.5; a contrast's coefficients must sum to zero (for example 1 and −1, or 2, −1 and −1).",
    );
    expect(contrastProblem({ C1: 0, C2: 0 })).toBe("At least one coefficient must be non-zero.");
    expect(contrastProblem({ C1: Number.NaN, C2: 1 })).toBe("Every coefficient must be a number.");
  });
});

describe("contrastPresets", () => {
  it("builds each treatment against the check", () => {
    const { presets } = contrastPresets(treatments);
    expect(presets.map((p) => p.id)).toEqual(["vs-check"]);
    expect(presets[0].contrasts.map((c) => c.name)).toEqual(["C2 vs C1", "C3 vs C1", "C4 vs C1"]);
    expect(presets[0].contrasts[0].coefficients).toEqual({ C1: -1, C2: 1, C3: 0, C4: 0 });
  });

  it("offers orthogonal polynomials for an equally spaced numeric rate, in rate order", () => {
    const rates = ["20", "0", "10", "30"].map((rate, i) => ({ code: `R${i}`, name: `${rate} Mg/ha`, isCheck: rate === "0", factorLevels: { rate } }));
    const { presets } = contrastPresets(rates);
    const poly = presets.find((p) => p.id === "poly-rate")!;
    // Fisher & Yates, 4 levels (DESIGN.md): linear −3 −1 1 3, quadratic 1 −1 −1 1, cubic −1 3 −3 1 — by rate 0, 10, 20, 30.
    expect(poly.contrasts.map((c) => c.name)).toEqual(["rate: linear", "rate: quadratic", "rate: cubic"]);
    expect(poly.contrasts[0].coefficients).toEqual({ R1: -3, R2: -1, R0: 1, R3: 3 });
    expect(poly.contrasts[1].coefficients).toEqual({ R1: 1, R2: -1, R0: -1, R3: 1 });
    expect(poly.contrasts[2].coefficients).toEqual({ R1: -1, R2: 3, R0: -3, R3: 1 });
    expect(nonOrthogonalPairs(poly.contrasts, rates.map((r) => r.code))).toEqual([]);
  });

  it("explains why unequal rates get no polynomial set", () => {
    const rates = ["0", "10", "30"].map((rate, i) => ({ code: `R${i}`, name: rate, isCheck: i === 0, factorLevels: { rate } }));
    const { presets, unavailable } = contrastPresets(rates);
    expect(presets.some((p) => p.id === "poly-rate")).toBe(false);
    expect(unavailable).toContain("rate levels 0, 10, 30 are not equally spaced; the tabulated polynomial coefficients assume equal spacing.");
  });
});

describe("nonOrthogonalPairs", () => {
  it("names the pairs whose products do not vanish", () => {
    // Treatment-vs-check contrasts share the check: Σ c d = (−1)(−1) = 1 for every pair.
    const { presets } = contrastPresets(treatments);
    const pairs = nonOrthogonalPairs(presets[0].contrasts, treatments.map((t) => t.code));
    expect(pairs).toHaveLength(3);
    expect(pairs[0]).toEqual({ a: "C2 vs C1", b: "C3 vs C1", product: 1 });
  });
});

describe("testTreatmentContrasts", () => {
  const fitted = fitResults(observations, request);

  it("matches the hand calculation on Montgomery & Runger Example 13-5", () => {
    const [outcome] = testTreatmentContrasts(fitted, [{ name: "C4 vs C1", coefficients: { C4: 1, C1: -1 } }], 0.05);
    expect(outcome.error).toBeNull();
    const r = outcome.result!;
    // Means from the table: C4 = 17.8/5 = 3.56, C1 = 5.7/5 = 1.14 → L = 2.42.
    expect(r.estimate).toBeCloseTo(2.42, 10);
    // MSE = 0.951/12 (Montgomery & Runger Ex 13-5); SE = √(MSE·(1² + 1²)/5).
    const mse = 0.951 / 12;
    expect(r.se).toBeCloseTo(Math.sqrt((mse * 2) / 5), 3);
    expect(r.df).toBe(12);
    expect(r.t).toBeCloseTo(2.42 / Math.sqrt((mse * 2) / 5), 1);
    expect(r.upper - r.estimate).toBeCloseTo(tQuantile(0.975, 12) * r.se, 10);
  });

  it("gives a contrast naming a treatment that is not in the trial an error, not a number", () => {
    const [outcome] = testTreatmentContrasts(fitted, [{ name: "old", coefficients: { C9: 1, C1: -1 } }], 0.05);
    expect(outcome.result).toBeNull();
    expect(outcome.error).toBe("Treatment C9 is not in this analysis; edit or delete the contrast.");
  });
});
