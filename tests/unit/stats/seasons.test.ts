import { describe, expect, it } from "vitest";
import {
  baselineAncova,
  greenhouseGeisserEpsilon,
  MissingPlotSeasonsError,
  perSeasonAnalyses,
  plotSlopes,
  rateOfChange,
  rowOf,
  seasonsAnalysis,
  separateMeans,
  splitPlotInTime,
  withinPlotSeasonCovariance,
  type SeasonPlot,
} from "../../../analysis/stats";
import { montgomerySplitPlot } from "./published-data";

/**
 * The paper-strength split-plot read as a split-plot in time: replicates as blocks, methods as
 * treatments, the four temperatures standing in for four seasons. The ANOVA arithmetic is the same.
 */
const seasonPlots: SeasonPlot[] = montgomerySplitPlot.map((p) => ({
  block: p.levels.rep,
  treatment: p.levels.method,
  season: p.levels.temperature,
  value: p.value,
}));
const layout = { block: "block", treatments: ["treatment"], season: "season" };
const leveled = seasonPlots.map(({ value, ...levels }) => ({ levels, value }));

describe("split-plot in time", () => {
  const result = splitPlotInTime(seasonPlots);

  it("has the strata block, treatment, block:treatment = error(a), season, treatment:season, residual = error(b)", () => {
    expect(result.table.map((r) => r.source)).toEqual([
      "block", "treatment", "block:treatment", "season", "treatment:season", "residual", "total",
    ]);
    expect(rowOf(result.table, "block:treatment").ss).toBeCloseTo(36.28, 2); // Montgomery, DAE split-plot: error(a) 36.28
    expect(rowOf(result.table, "treatment").f).toBeCloseTo(7.08, 2); // Montgomery, DAE split-plot: F method 7.08
    expect(rowOf(result.table, "treatment").errorTerm).toBe("block:treatment");
    expect(rowOf(result.table, "season").f).toBeCloseTo(36.43, 2); // Montgomery, DAE split-plot: F temperature 36.43
    expect(rowOf(result.table, "treatment:season").f).toBeCloseTo(3.15, 2); // Montgomery, DAE split-plot: F interaction 3.15
    expect(rowOf(result.table, "residual").df).toBe(18); // Montgomery, DAE split-plot: error(b) 18 df
  });

  it("reports Greenhouse–Geisser ε and corrected season-stratum p-values", () => {
    const { epsilon, adjusted, assumption } = result.sphericity;
    // Independent check: Box's (1954) original form ε = k²(s̄_dd − s̄)² / ((k − 1)(ΣΣs² − 2kΣs̄_i.² + k²s̄²)).
    const s = withinPlotSeasonCovariance(leveled, layout);
    const k = s.length;
    const diagMean = s.reduce((a, row, i) => a + row[i], 0) / k;
    const rowMeans = s.map((row) => row.reduce((a, v) => a + v, 0) / k);
    const grand = rowMeans.reduce((a, v) => a + v, 0) / k;
    const sumSq = s.reduce((a, row) => a + row.reduce((b, v) => b + v * v, 0), 0);
    const box = (k * k * (diagMean - grand) ** 2) / ((k - 1) * (sumSq - 2 * k * rowMeans.reduce((a, v) => a + v * v, 0) + k * k * grand * grand));
    expect(epsilon).toBeCloseTo(box, 10);
    expect(epsilon).toBeGreaterThanOrEqual(1 / (k - 1));
    expect(epsilon).toBeLessThanOrEqual(1);
    expect(adjusted.map((a) => a.source)).toEqual(["season", "treatment:season"]);
    expect(adjusted[0].df1).toBeCloseTo(3 * epsilon, 12);
    expect(adjusted[0].p).toBeGreaterThan(rowOf(result.table, "season").p!);
    expect(assumption).toMatch(/sphericity/);
  });

  it("builds the season covariance from the plot residuals: 1'S1·df/k = SS error(a) (Montgomery, DAE split-plot 36.28)", () => {
    const s = withinPlotSeasonCovariance(leveled, layout);
    const df = (3 - 1) * (3 - 1);
    const total = s.reduce((a, row) => a + row.reduce((b, v) => b + v, 0), 0);
    expect((total * df) / 4).toBeCloseTo(36.28, 2); // Montgomery, DAE split-plot: error(a) 36.28
  });

  it("treatments within one season are compared with the combined SE and Satterthwaite df", () => {
    const cmp = separateMeans(result, "treatment:season", { method: "lsd" }).comparisons.find(
      (c) => c.a === "1:200" && c.b === "2:200",
    )!;
    expect(cmp.df).toBeGreaterThan(4);
    expect(cmp.df).toBeLessThan(18);
  });

  it("names the missing plot-seasons and points to the per-season analyses", () => {
    const gappy = seasonPlots.map((p) =>
      p.block === "2" && p.treatment === "3" && p.season === "250" ? { ...p, value: null } : p,
    );
    const withoutRow = gappy.filter((p) => !(p.block === "1" && p.treatment === "1" && p.season === "200"));
    let error: unknown;
    try {
      splitPlotInTime(withoutRow);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(MissingPlotSeasonsError);
    const missing = (error as MissingPlotSeasonsError).missing;
    expect(missing).toEqual([
      { block: "1", treatment: "1", season: "200" },
      { block: "2", treatment: "3", season: "250" },
    ]);
    expect((error as Error).message).toContain("2 missing: block 1, treatment 1 in 200; block 2, treatment 3 in 250.");
    expect((error as Error).message).toContain("each season on its own");

    const bySeason = perSeasonAnalyses(gappy);
    expect(Object.keys(bySeason)).toEqual(["200", "225", "250", "275"]);
    expect(bySeason["250"].missing).toHaveLength(1);
    expect(rowOf(bySeason["250"].table, "residual").df).toBe(3); // (3 − 1)(3 − 1) − 1 missing
  });
});

describe("across seasons: completely randomized and factorial layouts", () => {
  it("completely randomized: plot within treatment is error(a) (Montgomery, DAE split-plot values pooled)", () => {
    // The paper-strength data with each rep × method whole plot given its own name and no blocks:
    // plot(treatment) pools replicates and error(a); the season stratum is unchanged.
    const crd = seasonPlots.map((p) => ({
      levels: { plot: `P${p.block}-${p.treatment}`, treatment: p.treatment, season: p.season },
      value: p.value,
    }));
    const result = seasonsAnalysis(crd, { plot: "plot", treatments: ["treatment"], season: "season" });
    expect(result.table.map((r) => r.source)).toEqual([
      "treatment", "plot(treatment)", "season", "treatment:season", "residual", "total",
    ]);
    expect(rowOf(result.table, "treatment").ss).toBeCloseTo(128.39, 2); // Montgomery, DAE split-plot: SS method 128.39
    expect(rowOf(result.table, "plot(treatment)").ss).toBeCloseTo(77.56 + 36.28, 1); // Montgomery split-plot: SS replicates 77.56 + error(a) 36.28
    expect(rowOf(result.table, "plot(treatment)").df).toBe(6);
    expect(rowOf(result.table, "treatment").errorTerm).toBe("plot(treatment)");
    expect(rowOf(result.table, "season").ss).toBeCloseTo(434.08, 2); // Montgomery, DAE split-plot: SS temperature 434.08
    expect(rowOf(result.table, "residual").ss).toBeCloseTo(71.5, 2); // Montgomery, DAE split-plot: error(b) 71.50
    expect(result.sphericity.epsilon).toBeGreaterThanOrEqual(1 / 3);
    expect(result.sphericity.epsilon).toBeLessThanOrEqual(1);

    const gap = crd.map((p, i) => (i === 0 ? { ...p, value: null } : p));
    expect(() => seasonsAnalysis(gap, { plot: "plot", treatments: ["treatment"], season: "season" })).toThrow(
      "1 missing: plot P1-1, treatment 1 in 200",
    );
  });

  it("factorial in RCBD: the factorial terms partition the treatment terms of both strata", () => {
    // Independent check: the same data analysed with one combined treatment factor.
    const values = [
      [12.1, 13.0, 14.2], [11.4, 12.9, 13.1], [13.3, 15.1, 16.0], [12.0, 12.2, 12.9],
      [11.8, 13.4, 13.9], [11.0, 12.1, 13.5], [13.9, 14.8, 16.6], [12.4, 12.0, 13.4],
      [12.6, 13.1, 14.8], [11.9, 12.7, 12.8], [13.1, 15.6, 15.7], [11.6, 12.8, 13.0],
    ];
    const plots = values.flatMap((series, k) => {
      const block = String(Math.floor(k / 4) + 1);
      const A = k % 2 === 0 ? "a1" : "a2";
      const B = k % 4 < 2 ? "b1" : "b2";
      return series.map((value, s) => ({ levels: { block, A, B, treatment: `${A}${B}`, season: `S${s + 1}` }, value }));
    });
    const factorial = seasonsAnalysis(plots, { block: "block", treatments: ["A", "B"], season: "season" });
    const single = seasonsAnalysis(plots, { block: "block", treatments: ["treatment"], season: "season" });
    const ss = (r: typeof factorial, source: string) => rowOf(r.table, source).ss;
    expect(factorial.table.map((r) => r.source)).toEqual([
      "block", "A", "B", "A:B", "block:A:B", "season", "A:season", "B:season", "A:B:season", "residual", "total",
    ]);
    expect(ss(factorial, "A") + ss(factorial, "B") + ss(factorial, "A:B")).toBeCloseTo(ss(single, "treatment"), 9);
    expect(ss(factorial, "block:A:B")).toBeCloseTo(ss(single, "block:treatment"), 9);
    expect(ss(factorial, "A:season") + ss(factorial, "B:season") + ss(factorial, "A:B:season")).toBeCloseTo(
      ss(single, "treatment:season"),
      9,
    );
    expect(rowOf(factorial.table, "A").errorTerm).toBe("block:A:B");
    expect(factorial.sphericity.epsilon).toBeCloseTo(single.sphericity.epsilon, 12);
  });
});

describe("Greenhouse–Geisser ε", () => {
  it("is 1 under compound symmetry and 1/(k − 1) at the lower bound", () => {
    // Independent check: compound symmetry σ²(ρJ + (1 − ρ)I) satisfies sphericity exactly (Box 1954).
    const cs = [0, 1, 2, 3].map((i) => [0, 1, 2, 3].map((j) => (i === j ? 4 : 1.5)));
    expect(greenhouseGeisserEpsilon(cs)).toBeCloseTo(1, 12);
    // A covariance whose centred form has rank one gives the lower bound 1/(k − 1).
    const v = [1, -2, 0.5, 0.5];
    const rankOne = v.map((a) => v.map((b) => a * b));
    expect(greenhouseGeisserEpsilon(rankOne)).toBeCloseTo(1 / 3, 12);
  });
});

describe("change-from-baseline ANCOVA", () => {
  // Montgomery, DAE, ch. 15 analysis-of-covariance example: breaking strength y of fibre from three
  // machines with the fibre diameter x as covariate (here x plays the baseline). Data from memory.
  const y = [36, 41, 39, 42, 49, 40, 48, 39, 45, 44, 35, 37, 42, 34, 32];
  const x = [20, 25, 24, 25, 32, 22, 28, 22, 30, 28, 21, 23, 26, 21, 15];
  const treatment = (i: number) => `M${Math.floor(i / 5) + 1}`;
  // value − baseline = y, so the analysed change is Montgomery's response.
  const result = baselineAncova(y.map((v, i) => ({ treatment: treatment(i), baseline: x[i], value: v + x[i] })));

  it("reproduces the adjusted treatment SS, error SS, slope and adjusted means", () => {
    expect(rowOf(result.table, "treatment").ss).toBeCloseTo(13.28, 2); // Montgomery, DAE ANCOVA example: SS adjusted treatments 13.28 (from memory; numpy lstsq 13.2839)
    expect(rowOf(result.table, "residual").ss).toBeCloseTo(27.99, 2); // Montgomery, DAE ANCOVA example: SSE 27.99 on 11 df (from memory; numpy 27.9859)
    expect(rowOf(result.table, "residual").df).toBe(11);
    expect(rowOf(result.table, "treatment").f).toBeCloseTo(2.61, 2); // Montgomery, DAE ANCOVA example: F0 = 2.61 (from memory)
    expect(result.slope.estimate).toBeCloseTo(0.954, 3); // Montgomery, DAE ANCOVA example: β̂ = 0.954 (from memory)
    const adjusted = result.means.treatment.means;
    expect(adjusted[0]).toBeCloseTo(40.38, 2); // Montgomery, DAE ANCOVA example: adjusted mean machine 1 40.38 (from memory)
    expect(adjusted[1]).toBeCloseTo(41.42, 2); // Montgomery, DAE ANCOVA example: adjusted mean machine 2 41.42 (from memory)
    expect(adjusted[2]).toBeCloseTo(38.8, 2); // Montgomery, DAE ANCOVA example: adjusted mean machine 3 38.80 (from memory)
    expect(result.baselineMean).toBeCloseTo(x.reduce((s, v) => s + v, 0) / 15, 12);
  });

  it("gives the same treatment test whether the response is read as change or as final value", () => {
    // Independent check: regressing (y − x) on x shifts the slope by 1 and leaves the treatment SS unchanged.
    const asFinal = baselineAncova(y.map((v, i) => ({ treatment: treatment(i), baseline: x[i], value: v })));
    expect(rowOf(asFinal.table, "treatment").ss).toBeCloseTo(rowOf(result.table, "treatment").ss, 9);
    expect(asFinal.slope.estimate).toBeCloseTo(result.slope.estimate - 1, 9);
  });

  it("takes blocks and says when a baseline is not a number", () => {
    const plots = y.map((v, i) => ({ block: String((i % 5) + 1), treatment: treatment(i), baseline: x[i], value: v }));
    const blocked = baselineAncova(plots);
    expect(blocked.table.map((r) => r.source)).toEqual(["block", "treatment", "baseline", "residual", "total"]);
    expect(rowOf(blocked.table, "residual").df).toBe(7);
    expect(() => baselineAncova(plots.map((p, i) => (i === 3 ? { ...p, baseline: Number.NaN } : p)))).toThrow(
      "block 4, treatment M1: the baseline is not a number",
    );
  });
});

describe("rate of change", () => {
  it("fits one slope per plot and analyses the slopes as an RCBD", () => {
    // Independent check: values built on exact lines y = a + b·t, so each slope is recovered exactly.
    const rates: Record<string, number[]> = { check: [0.1, 0.0, 0.2], compost: [0.9, 1.1, 1.0], mulch: [0.5, 0.6, 0.4] };
    const times = [0, 0.5, 1, 1.5, 2];
    const plots = Object.entries(rates).flatMap(([treatment, bs]) =>
      bs.flatMap((b, blockIndex) => times.map((t) => ({ block: String(blockIndex + 1), treatment, timeYears: t, value: 2 + b * t }))),
    );
    const { slopes, anova } = rateOfChange(plots);
    expect(slopes.find((s) => s.treatment === "compost" && s.block === "2")!.slopePerYear).toBeCloseTo(1.1, 12);
    expect(anova.means.treatment.means[1]).toBeCloseTo(1.0, 12);
    expect(anova.design).toBe("rcbd");
    expect(rowOf(anova.table, "residual").df).toBe(4);
  });

  it("treats a plot with fewer than two sampled times as a missing plot", () => {
    const plots = [
      ...["1", "2", "3"].flatMap((block) =>
        ["A", "B"].flatMap((treatment) => [0, 1, 2].map((t) => ({ block, treatment, timeYears: t, value: t * (treatment === "A" ? 1 : 2) + Number(block) }))),
      ),
    ].map((p) => (p.block === "3" && p.treatment === "B" && p.timeYears > 0 ? { ...p, value: null } : p));
    const slopes = plotSlopes(plots);
    expect(slopes.find((s) => s.block === "3" && s.treatment === "B")).toEqual({ block: "3", treatment: "B", slopePerYear: null, points: 1 });
    const { anova } = rateOfChange(plots);
    expect(anova.missing).toHaveLength(1);
  });
});
