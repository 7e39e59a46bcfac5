import { describe, expect, it } from "vitest";
import { mulberry32 } from "../../../analysis/design/random";
import {
  compactLetterDisplay,
  fitLinearModel,
  linearCombinationVariance,
  pairDifferenceVariance,
  seasonsAnalysis,
  splitPlotTerms,
  toModelData,
  factorialTerms,
  crossedTerm,
  type LeveledPlot,
  type Term,
} from "../../../analysis/stats";

// Randomized properties over designs with three crossed factors (the RCBD ones live in
// linear-model.test.ts). Seeds are fixed, so every run draws the same data.

const relativeDifference = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), 1e-300);

/** A balanced block × treatment × season layout with random values. */
function randomSeasonsLayout(seed: number): LeveledPlot[] {
  const random = mulberry32(seed);
  const t = 2 + Math.floor(random() * 4);
  const b = 2 + Math.floor(random() * 3);
  const s = 2 + Math.floor(random() * 4);
  const plots: LeveledPlot[] = [];
  for (let block = 1; block <= b; block++) {
    for (let treatment = 1; treatment <= t; treatment++) {
      for (let season = 1; season <= s; season++) {
        plots.push({ levels: { block: `B${block}`, treatment: `T${treatment}`, season: `S${season}` }, value: 20 + 10 * random() });
      }
    }
  }
  return plots;
}

const designs: { name: string; terms: Term[] }[] = [
  { name: "split-plot in time (block, treatment, block:treatment, season, treatment:season)", terms: splitPlotTerms("block", ["treatment"], ["season"]).terms },
  { name: "three-factor factorial", terms: factorialTerms(["block", "treatment", "season"]).filter((t) => t.label !== "block:treatment:season") },
  { name: "factorial in blocks", terms: [crossedTerm("block"), ...factorialTerms(["treatment", "season"])] },
];

describe("sums of squares over three crossed factors (randomized properties, 10 draws each)", () => {
  for (const { name, terms } of designs) {
    it(`${name}: closed form = QR; components add to the total; row order, shifts and scaling behave`, () => {
      for (let draw = 0; draw < 10; draw++) {
        const plots = randomSeasonsLayout(1000 + draw);
        const names = ["block", "treatment", "season"];
        const data = toModelData(plots, names);
        const closed = fitLinearModel(data, terms, "closed-form");
        const qr = fitLinearModel(data, terms, "least-squares");
        closed.termSums.forEach((t, k) => {
          expect(qr.termSums[k].df).toBe(t.df);
          expect(relativeDifference(qr.termSums[k].ss, t.ss)).toBeLessThan(1e-9);
        });
        expect(relativeDifference(qr.residual.ss, closed.residual.ss)).toBeLessThan(1e-9);

        const sum = closed.termSums.reduce((s, t) => s + t.ss, 0) + closed.residual.ss;
        expect(relativeDifference(sum, closed.total.ss)).toBeLessThan(1e-10);

        const reversed = fitLinearModel(toModelData([...plots].reverse(), names), terms, "closed-form");
        closed.termSums.forEach((t, k) => expect(relativeDifference(reversed.termSums[k].ss, t.ss)).toBeLessThan(1e-10));

        const shifted = fitLinearModel({ ...data, y: data.y.map((v) => v + 1000) }, terms, "closed-form");
        const scaled = fitLinearModel({ ...data, y: data.y.map((v) => v * 3) }, terms, "closed-form");
        closed.termSums.forEach((t, k) => {
          expect(relativeDifference(shifted.termSums[k].ss, t.ss)).toBeLessThan(1e-8);
          expect(relativeDifference(scaled.termSums[k].ss, 9 * t.ss)).toBeLessThan(1e-10); // scaling by k = 3 scales SS by k² = 9
        });
      }
    });
  }
});

describe("pairwise variances", () => {
  it("pairDifferenceVariance equals linearCombinationVariance with c = e_i − e_j, strata mixed (random split-plots in time)", () => {
    for (let draw = 0; draw < 10; draw++) {
      const result = seasonsAnalysis(randomSeasonsLayout(2000 + draw), { block: "block", treatments: ["treatment"], season: "season" });
      const set = result.means["treatment:season"];
      for (let i = 0; i < set.means.length; i++) {
        for (let j = i + 1; j < set.means.length; j++) {
          const c = set.means.map((_, k) => (k === i ? 1 : k === j ? -1 : 0));
          expect(pairDifferenceVariance(set, i, j)).toEqual(linearCombinationVariance(set, c));
        }
      }
    }
  });
});

describe("compact letter display with many means", () => {
  it("two means share a letter exactly when they do not differ (brute force, 30–45 means, 20 patterns)", () => {
    const random = mulberry32(4242);
    for (let draw = 0; draw < 20; draw++) {
      const k = 30 + Math.floor(random() * 16);
      const means = Array.from({ length: k }, () => random() * 100);
      // Differences mostly between distant means, as in real data, plus some noise.
      const differs = (i: number, j: number) => Math.abs(means[i] - means[j]) > 25 + 20 * Math.sin(i * 7 + j * 3);
      // Past 52 letters the names gain a number ("a1"), so split the strings into names.
      const letters = compactLetterDisplay(means, differs).map((l): string[] => l.match(/[A-Za-z]\d*/g) ?? []);
      for (let i = 0; i < k; i++) {
        expect(letters[i].length).toBeGreaterThan(0);
        for (let j = i + 1; j < k; j++) {
          const share = letters[i].some((l) => letters[j].includes(l));
          expect(share, `means ${i} and ${j}`).toBe(!differs(i, j));
        }
      }
      expect(letters[means.indexOf(Math.max(...means))]).toContain("a");
    }
  });
});
