// The results composition: the right model, the same numbers as the library, and messages.
import { describe, expect, it } from "vitest";
import { analyzeResults, defaultSeason, ResultsError, type PlotObservation, type ResultsRequest } from "../../analysis/results";

// Montgomery, DAE, Example 4.1 — 4 pressures (treatments) × 6 batches (blocks).
const ex41 = [
  [90.3, 89.2, 98.2, 93.9, 87.4, 97.9],
  [92.5, 89.5, 90.6, 94.7, 87.0, 95.8],
  [85.5, 90.8, 89.6, 86.2, 88.0, 93.4],
  [82.5, 89.5, 85.6, 87.4, 78.9, 90.7],
];
const treatments = ["P1", "P2", "P3", "P4"].map((code, i) => ({ code, name: `Pressure ${i + 1}`, isCheck: i === 3 }));

function season(values: number[][], label: string, order: number, plotOffset = 0): PlotObservation[] {
  return values.flatMap((row, t) =>
    row.map((value, b) => ({
      plotNumber: (b + 1) * 100 + t + 1 + plotOffset,
      block: b + 1,
      treatment: treatments[t].code,
      season: label,
      seasonOrder: order,
      isBaseline: false,
      yearsFromBaseline: order,
      value,
      excluded: false,
    })),
  );
}

const request: ResultsRequest = { design: "rcbd", treatments, model: "per_season", method: "tukey", alpha: 0.05 };

describe("per-season RCBD", () => {
  const payload = analyzeResults(season(ex41, "S1", 1), request);

  it("reproduces the published ANOVA", () => {
    const row = (s: string) => payload.anova.find((r) => r.source === s)!;
    expect(row("treatment").ss).toBeCloseTo(178.171, 2); // Montgomery DAE Ex 4.1: SS treatment 178.171
    expect(row("block").ss).toBeCloseTo(192.252, 2); // Montgomery DAE Ex 4.1: SS block 192.252
    expect(row("residual").ss).toBeCloseTo(109.886, 2); // Montgomery DAE Ex 4.1: SS error 109.886
    expect(row("treatment").f).toBeCloseTo(8.107, 2); // Montgomery DAE Ex 4.1: F = 8.107
    expect(row("treatment").errorTerm).toBe("residual");
  });

  it("reports differences from the check that equal the matching pairwise comparisons", () => {
    const p1 = payload.means.find((m) => m.code === "P1")!;
    const pair = payload.comparisons.find((c) => [c.a, c.b].sort().join() === "P1,P4")!;
    expect(Math.abs(p1.vsCheck!.diff)).toBeCloseTo(Math.abs(pair.diff), 10);
    expect(p1.vsCheck!.p).toBeCloseTo(pair.p, 10);
    // Treatment − check, from the data: mean P1 − mean P4 (hand calculation from the table above).
    const mean = (r: number[]) => r.reduce((s, v) => s + v, 0) / r.length;
    expect(p1.vsCheck!.diff).toBeCloseTo(mean(ex41[0]) - mean(ex41[3]), 10);
    expect(payload.means.find((m) => m.code === "P4")!.vsCheck).toBeNull();
  });

  it("gives the highest mean the letter a", () => {
    const top = [...payload.means].sort((a, b) => b.mean - a.mean)[0];
    expect(top.group.startsWith("a")).toBe(true);
  });

  it("counts and estimates a missing plot", () => {
    const rows = season(ex41, "S1", 1).map((r) => (r.treatment === "P1" && r.block === 3 ? { ...r, value: null } : r));
    const missing = analyzeResults(rows, request);
    expect(missing.missing).toHaveLength(1);
    expect(missing.missing[0].plotNumber).toBe(301);
    expect(missing.missing[0].estimate).toBeCloseTo(91.513, 2); // Montgomery DAE Ex 4.1 missing value: x = 91.513
    expect(missing.anova.find((r) => r.source === "treatment")!.ss).toBeCloseTo(136.996, 2); // adjusted SS 136.996
    expect(missing.notes.join(" ")).toMatch(/1 missing plot value/);
  });

  it("says so when the protected LSD is shown with a non-significant F", () => {
    const flat = ex41.map((row) => row.map((v, b) => 90 + b + (v % 1) / 100));
    const payload = analyzeResults(season(flat, "S1", 1), { ...request, method: "lsd" });
    expect(payload.notes.join(" ")).toMatch(/protected LSD is shown although the treatment F test is not significant/);
  });
});

describe("across seasons", () => {
  // Montgomery, DAE, split-plot paper strength: 3 replicates (blocks) × 3 pulp methods (treatments)
  // × 4 temperatures, read here as 4 seasons of the same plots.
  const reps = [
    [[30, 35, 37, 36], [34, 41, 38, 42], [29, 26, 33, 36]],
    [[28, 32, 40, 41], [31, 36, 42, 40], [31, 30, 32, 40]],
    [[31, 37, 41, 40], [35, 40, 39, 44], [32, 34, 39, 45]],
  ];
  const three = treatments.slice(0, 3);
  const rows: PlotObservation[] = reps.flatMap((methods, b) =>
    methods.flatMap((temps, t) =>
      temps.map((value, s) => ({
        plotNumber: (b + 1) * 100 + t + 1,
        block: b + 1,
        treatment: three[t].code,
        season: `T${s + 1}`,
        seasonOrder: s + 1,
        isBaseline: false,
        yearsFromBaseline: s,
        value,
        excluded: false,
      })),
    ),
  );
  const req: ResultsRequest = { ...request, treatments: three, model: "split_plot_time" };

  it("uses block:treatment as error(a) and the residual as error(b)", () => {
    const payload = analyzeResults(rows, req);
    const row = (s: string) => payload.anova.find((r) => r.source === s)!;
    expect(row("block").ss).toBeCloseTo(77.56, 1); // Montgomery DAE split-plot: SS replicates 77.56
    expect(row("treatment").ss).toBeCloseTo(128.39, 1); // SS method 128.39
    expect(row("block:treatment").ss).toBeCloseTo(36.28, 1); // error(a) 36.28 on 4 df
    expect(row("treatment").errorTerm).toBe("block:treatment");
    expect(row("treatment").f).toBeCloseTo(7.08, 1); // F method 7.08
    expect(row("season").ss).toBeCloseTo(434.08, 1); // SS temperature 434.08
    expect(row("treatment:season").ss).toBeCloseTo(75.17, 1); // interaction 75.17
    expect(row("residual").ss).toBeCloseTo(71.5, 1); // error(b) 71.50 on 18 df
    expect(payload.sphericity!.epsilon).toBeGreaterThan(0);
    expect(payload.sphericity!.epsilon).toBeLessThanOrEqual(1);
    expect(payload.seasonMeans).toHaveLength(4);
    expect(payload.seasonMeans[0].means.map((m) => m.code).sort()).toEqual(["P1", "P2", "P3"]);
  });

  it("leaves a baseline sampling out of the analysis and says so", () => {
    const baseline = rows.filter((r) => r.season === "T1").map((r) => ({ ...r, season: "T0", seasonOrder: 0, isBaseline: true, value: r.value! - 5 }));
    const withBaseline = analyzeResults([...baseline, ...rows], req);
    const without = analyzeResults(rows, req);
    // Same ANOVA as without the baseline rows (Montgomery's four temperatures only).
    expect(withBaseline.anova.map((r) => r.ss)).toEqual(without.anova.map((r) => r.ss));
    expect(withBaseline.seasonMeans.map((s) => s.season)).toEqual(["T1", "T2", "T3", "T4"]);
    expect(withBaseline.notes).toContain("The baseline (T0) is left out: it was sampled before the treatments were applied.");
    expect(without.notes.some((n) => n.includes("baseline"))).toBe(false);
  });

  it("names the missing plot-seasons and points to per-season analyses", () => {
    const holed = rows.map((r) => (r.plotNumber === 202 && r.season === "T3" ? { ...r, value: null } : r));
    expect(() => analyzeResults(holed, req)).toThrow(ResultsError);
    expect(() => analyzeResults(holed, req)).toThrow(/plot 202 in T3.*Analyse each season on its own/);
  });
});

describe("rate of change", () => {
  it("recovers per-plot slopes and compares them", () => {
    // Each plot rises by (treatment index + 1) units a year, plus a block offset, with a small disturbance
    // in block 2's last year so the residual is not zero: slopes near 1, 2, 3, 4.
    const rows: PlotObservation[] = [0, 1, 2].flatMap((year) =>
      treatments.flatMap((t, i) =>
        [1, 2, 3].map((block) => ({
          plotNumber: block * 100 + i + 1,
          block,
          treatment: t.code,
          season: `Y${year}`,
          seasonOrder: year,
          isBaseline: year === 0,
          yearsFromBaseline: year,
          value: 10 + block + (i + 1) * year + (block === 2 && year === 2 ? 0.1 * (i - 1.5) : 0),
          excluded: false,
        })),
      ),
    );
    const payload = analyzeResults(rows, { ...request, model: "rate_of_change" });
    const p4 = payload.means.find((m) => m.code === "P4")!;
    expect(p4.mean).toBeCloseTo(4, 1); // constructed slope 4 per year
    expect(p4.vsCheck).toBeNull();
    expect(payload.means.find((m) => m.code === "P1")!.vsCheck!.diff).toBeCloseTo(-3, 1); // 1 − 4 (constructed)
  });
});

describe("messages", () => {
  it("refuses an empty selection", () => {
    expect(() => analyzeResults([], request)).toThrow("There are no values of this variable at this depth yet.");
  });
  it("refuses an unknown season", () => {
    expect(() => analyzeResults(season(ex41, "S1", 1), { ...request, season: "nope" })).toThrow("There are no values in season “nope”.");
  });
});

describe("the season shown when none is chosen", () => {
  const full = (label: string, order: number) => season(ex41, label, order);
  it("is the latest season, even with a plot missing", () => {
    const rows = [...full("2025 fall", 1), ...full("2026 fall", 2).slice(1)]; // 23 of 24 plots
    expect(defaultSeason(rows)).toEqual({ season: "2026 fall", skipped: [] });
  });

  it("passes over a newer season whose results are still arriving, and says so", () => {
    const arriving = full("2027 spring", 3).filter((r) => (r.block ?? 0) <= 3); // 12 of 24 plots, blocks 1–3
    const rows = [...full("2025 fall", 1), ...full("2026 fall", 2), ...arriving];
    expect(defaultSeason(rows)).toEqual({ season: "2026 fall", skipped: [{ season: "2027 spring", plots: 12, of: 24 }] });
    const payload = analyzeResults(rows, request);
    expect(payload.season).toBe("2026 fall");
    expect(payload.notes).toContain("2027 spring is not shown by default: 12 of 24 plots measured so far. Choose it under Season to analyse it anyway.");
    // Chosen explicitly, it is analysed.
    expect(analyzeResults(rows, { ...request, season: "2027 spring" }).season).toBe("2027 spring");
  });
});
