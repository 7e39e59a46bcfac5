import { describe, expect, it } from "vitest";
import jStat from "jstat";
import {
  completelyRandomizedLayout,
  factorialCombinations,
  factorialRcbdLayout,
  rcbdLayout,
  splitPlotLayout,
  type FieldLayout,
  type LayoutPlot,
} from "../../../analysis/design";

const SIX = ["CHK", "YWC", "LMC", "SHM", "CXD", "MAN"];

function byStrip(layout: FieldLayout): Map<number, LayoutPlot[]> {
  const strips = new Map<number, LayoutPlot[]>();
  for (const p of layout.plots) strips.set(p.strip, [...(strips.get(p.strip) ?? []), p]);
  return strips;
}

/**
 * Pearson χ² goodness-of-fit p-value that `counts` are uniform over their cells (df = cells − 1),
 * from jstat's chi-square distribution.
 */
function uniformityP(counts: number[]): number {
  const total = counts.reduce((a, b) => a + b, 0);
  const expected = total / counts.length;
  const chi2 = counts.reduce((s, o) => s + (o - expected) ** 2 / expected, 0);
  return 1 - jStat.chisquare.cdf(chi2, counts.length - 1);
}

describe("rcbdLayout", () => {
  const layout = rcbdLayout({ treatments: SIX, blocks: 4, seed: 2025 });

  it("has every treatment exactly once in every block", () => {
    // Definition of the RCBD (Cochran & Cox 1957, ch. 4, from memory)
    expect(layout.plots).toHaveLength(24);
    for (const plots of byStrip(layout).values()) {
      expect(plots.map((p) => p.treatment).sort()).toEqual([...SIX].sort());
    }
  });

  it("numbers plots block × 100 + position", () => {
    // Common field convention (issue 3): 101, 102 … 201 …
    expect(layout.plots.map((p) => p.plotNumber)).toEqual(
      [1, 2, 3, 4].flatMap((b) => [1, 2, 3, 4, 5, 6].map((pos) => b * 100 + pos)),
    );
    for (const p of layout.plots) {
      expect(p.block).toBe(p.strip);
      expect(p.plotNumber).toBe(p.block! * 100 + p.position);
    }
  });

  it("gives the same layout for the same seed, every time", () => {
    expect(rcbdLayout({ treatments: SIX, blocks: 4, seed: 2025 })).toEqual(layout);
  });

  it("gives a different layout for a different seed", () => {
    const other = rcbdLayout({ treatments: SIX, blocks: 4, seed: 2026 });
    expect(other.plots.map((p) => p.treatment)).not.toEqual(layout.plots.map((p) => p.treatment));
  });

  it("straight: every block is numbered from the same end", () => {
    for (const p of layout.plots) expect(p.column).toBe(p.position);
  });

  it("serpentine: even blocks run back, without changing the randomization", () => {
    const snake = rcbdLayout({ treatments: SIX, blocks: 4, seed: 2025, arrangement: "serpentine" });
    expect(snake.plots.map((p) => p.treatment)).toEqual(layout.plots.map((p) => p.treatment));
    const at = (n: number) => snake.plots.find((p) => p.plotNumber === n)!;
    expect(at(101).column).toBe(1);
    expect(at(106).column).toBe(6);
    expect(at(201).column).toBe(6); // 201 sits beside 106, where the crew turns
    expect(at(206).column).toBe(1);
    expect(at(301).column).toBe(1);
  });

  it("over 2,000 seeds each treatment falls in each within-block position uniformly (χ², α = 0.001)", () => {
    // DESIGN.md / issue 3 randomization check. For one treatment, its position in a uniformly random
    // permutation is uniform over the t positions, so its counts over positions (all blocks, all
    // seeds) follow a multinomial: Pearson χ² with t − 1 = 5 df.
    const counts = new Map(SIX.map((t) => [t, new Array(SIX.length).fill(0)]));
    for (let seed = 1; seed <= 2000; seed++) {
      for (const p of rcbdLayout({ treatments: SIX, blocks: 4, seed }).plots)
        counts.get(p.treatment)![p.position - 1]++;
    }
    for (const [, c] of counts) {
      expect(c.reduce((a: number, b: number) => a + b, 0)).toBe(8000);
      expect(uniformityP(c)).toBeGreaterThan(0.001);
    }
  });

  it("refuses duplicate treatment codes, too few treatments and over-full blocks", () => {
    expect(() => rcbdLayout({ treatments: ["A", "B", "A"], blocks: 3, seed: 1 })).toThrow(/"A" appears twice/);
    expect(() => rcbdLayout({ treatments: ["A"], blocks: 3, seed: 1 })).toThrow(/at least 2 treatments/);
    expect(() => rcbdLayout({ treatments: SIX, blocks: 0, seed: 1 })).toThrow(/number of blocks/);
    const many = Array.from({ length: 100 }, (_, i) => `T${i}`);
    expect(() => rcbdLayout({ treatments: many, blocks: 2, seed: 1 })).toThrow(/at most 99 plots/);
    expect(() => rcbdLayout({ treatments: SIX, blocks: 2, seed: -3 })).toThrow(/seed/);
  });
});

describe("completelyRandomizedLayout", () => {
  it("places each treatment `replicates` times, unblocked, numbered by field row", () => {
    const layout = completelyRandomizedLayout({ treatments: ["A", "B", "C"], replicates: 4, seed: 11 });
    expect(layout.plots).toHaveLength(12);
    for (const t of ["A", "B", "C"]) expect(layout.plots.filter((p) => p.treatment === t)).toHaveLength(4);
    expect(layout.plots.every((p) => p.block === null)).toBe(true);
    expect(layout.plots.map((p) => p.plotNumber)).toEqual([101, 102, 103, 201, 202, 203, 301, 302, 303, 401, 402, 403]);
    expect(completelyRandomizedLayout({ treatments: ["A", "B", "C"], replicates: 4, seed: 11 })).toEqual(layout);
  });

  it("does not force each treatment into every row (unlike blocks)", () => {
    // Over many seeds, some row lacks some treatment — the defining difference from an RCBD.
    const someRowIncomplete = Array.from({ length: 50 }, (_, seed) =>
      completelyRandomizedLayout({ treatments: ["A", "B", "C"], replicates: 4, seed }),
    ).some((layout) => [...byStrip(layout).values()].some((row) => new Set(row.map((p) => p.treatment)).size < 3));
    expect(someRowIncomplete).toBe(true);
  });

  it("fills a short last row when plots per row do not divide the total", () => {
    const layout = completelyRandomizedLayout({
      treatments: ["A", "B", "C"],
      replicates: 3,
      seed: 5,
      plotsPerRow: 4,
      arrangement: "serpentine",
    });
    expect(layout.plots.map((p) => p.plotNumber)).toEqual([101, 102, 103, 104, 201, 202, 203, 204, 301]);
    expect(layout.plots.find((p) => p.plotNumber === 201)!.column).toBe(4);
  });
});

describe("factorial designs", () => {
  const factors = [
    { name: "amendment", levels: ["compost", "manure"] },
    { name: "rate", levels: ["0", "10", "20"] },
  ];

  it("generates every combination of levels, first factor slowest", () => {
    // 2 × 3 = 6 combinations (definition of a full factorial)
    const combos = factorialCombinations(factors);
    expect(combos.map((c) => c.code)).toEqual([
      "compost × 0",
      "compost × 10",
      "compost × 20",
      "manure × 0",
      "manure × 10",
      "manure × 20",
    ]);
    expect(combos[4].levels).toEqual({ amendment: "manure", rate: "10" });
  });

  it("three factors give the product of their level counts", () => {
    // 2 × 3 × 2 = 12
    expect(factorialCombinations([...factors, { name: "drench", levels: ["no", "yes"] }])).toHaveLength(12);
  });

  it("factorial in RCBD has each combination once per block and keeps the levels", () => {
    const layout = factorialRcbdLayout({ factors, blocks: 3, seed: 77 });
    expect(layout.plots).toHaveLength(18);
    for (const plots of byStrip(layout).values()) {
      expect(plots.map((p) => p.treatment).sort()).toEqual(
        factorialCombinations(factors)
          .map((c) => c.code)
          .sort(),
      );
    }
    for (const p of layout.plots) expect(p.treatment).toBe(`${p.levels!.amendment} × ${p.levels!.rate}`);
    expect(factorialRcbdLayout({ factors, blocks: 3, seed: 77 })).toEqual(layout);
  });

  it("refuses a factor with one level or repeated names", () => {
    expect(() => factorialCombinations([{ name: "rate", levels: ["10"] }])).toThrow(
      /at least 2 levels of factor "rate"/,
    );
    expect(() => factorialCombinations([factors[0], factors[0]])).toThrow(/"amendment" appears twice/);
  });
});

describe("splitPlotLayout", () => {
  const mainFactor = { name: "tillage", levels: ["none", "disk", "plow"] };
  const subFactor = { name: "amendment", levels: ["check", "compost", "manure", "mulch"] };
  const layout = splitPlotLayout({ mainFactor, subFactor, blocks: 4, seed: 31 });

  it("has every main-plot level once per block and every sub-plot level once per main plot", () => {
    // Definition of the split-plot design (Gomez & Gomez 1984, ch. 3, from memory)
    expect(layout.plots).toHaveLength(48);
    for (const plots of byStrip(layout).values()) {
      const mains = new Map<number, LayoutPlot[]>();
      for (const p of plots) mains.set(p.mainPlot!, [...(mains.get(p.mainPlot!) ?? []), p]);
      expect(mains.size).toBe(3);
      const mainLevels = [...mains.values()].map((sub) => {
        const levels = new Set(sub.map((p) => p.levels!.tillage));
        expect(levels.size).toBe(1); // one main-plot level per main plot
        expect(sub.map((p) => p.levels!.amendment).sort()).toEqual([...subFactor.levels].sort());
        return [...levels][0];
      });
      expect(mainLevels.sort()).toEqual([...mainFactor.levels].sort());
    }
  });

  it("keeps the sub-plots of a main plot next to each other", () => {
    for (const p of layout.plots) expect(p.mainPlot).toBe(Math.ceil(p.position / 4));
  });

  it("same seed, same layout", () => {
    expect(splitPlotLayout({ mainFactor, subFactor, blocks: 4, seed: 31 })).toEqual(layout);
  });

  it("over 2,000 seeds, main-plot levels are uniform over main-plot positions and sub-plot levels over sub-plot positions (χ², α = 0.001)", () => {
    // As for the RCBD: within a block, main-plot order is a uniform permutation; within a main plot,
    // sub-plot order is a uniform permutation. Pearson χ² with 2 and 3 df.
    const mainCounts = new Map(mainFactor.levels.map((l) => [l, [0, 0, 0]]));
    const subCounts = new Map(subFactor.levels.map((l) => [l, [0, 0, 0, 0]]));
    for (let seed = 1; seed <= 2000; seed++) {
      for (const p of splitPlotLayout({ mainFactor, subFactor, blocks: 2, seed }).plots) {
        const subPosition = (p.position - 1) % 4;
        if (subPosition === 0) mainCounts.get(p.levels!.tillage)![p.mainPlot! - 1]++;
        subCounts.get(p.levels!.amendment)![subPosition]++;
      }
    }
    for (const c of [...mainCounts.values(), ...subCounts.values()]) expect(uniformityP(c)).toBeGreaterThan(0.001);
  });
});
