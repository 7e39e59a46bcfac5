import { describe, expect, it } from "vitest";
import {
  compactLetterDisplay,
  compareWithCheck,
  fQuantile,
  oneWayAnova,
  rcbdAnova,
  rowOf,
  satterthwaiteDf,
  separateMeans,
  separateMeansWithin,
  splitPlotAnova,
  studentizedRangeQuantile,
  studentizedRangeUpperP,
  tQuantile,
} from "../../../analysis/stats";
import { montgomeryEx41Rows, montgomerySplitPlot, rcbdFromRows } from "./published-data";

describe("distribution table values (through jstat)", () => {
  it("matches standard statistical tables", () => {
    expect(studentizedRangeQuantile(0.95, 3, 12)).toBeCloseTo(3.773, 3); // standard tables: q0.05(3, 12) = 3.773
    expect(studentizedRangeQuantile(0.95, 4, 20)).toBeCloseTo(3.958, 3); // standard tables: q0.05(4, 20) = 3.958
    expect(studentizedRangeQuantile(0.95, 5, 12)).toBeCloseTo(4.508, 3); // standard tables: q0.05(5, 12) = 4.508
    expect(studentizedRangeUpperP(3.773, 3, 12)).toBeCloseTo(0.05, 4); // standard tables: q0.05(3, 12) = 3.773
    expect(tQuantile(0.975, 15)).toBeCloseTo(2.131, 3); // standard tables: t0.975,15 = 2.131
    expect(fQuantile(0.95, 3, 15)).toBeCloseTo(3.287, 3); // standard tables: F0.95(3, 15) = 3.287
  });
});

/** Four treatments × six replicates, completely randomized: error df 20 for the q(4, 20) table value. */
const fourBySix = {
  A: [21.1, 23.4, 22.0, 24.2, 22.8, 23.1],
  B: [25.3, 24.8, 26.9, 25.1, 27.0, 26.2],
  C: [22.9, 24.1, 23.3, 25.0, 23.8, 24.6],
  D: [27.8, 28.9, 26.7, 29.4, 28.1, 27.5],
};
const fourBySixPlots = Object.entries(fourBySix).flatMap(([treatment, vs]) => vs.map((value) => ({ treatment, value })));

describe("Tukey–Kramer", () => {
  it("HSD = q0.05(4, 20)·√(MSE/r) for a balanced one-way layout", () => {
    const result = oneWayAnova(fourBySixPlots);
    const mse = rowOf(result.table, "residual").ms!;
    const sep = separateMeans(result, "treatment");
    expect(sep.method).toBe("tukey");
    expect(sep.criticalDifference).toBeCloseTo(3.958 * Math.sqrt(mse / 6), 2); // standard tables: q0.05(4, 20) = 3.958
    // Every pair's CI half-width is the HSD, and "significant" agrees with |diff| > HSD.
    for (const c of sep.comparisons) {
      expect(c.upper - c.diff).toBeCloseTo(sep.criticalDifference!, 10);
      expect(c.significant).toBe(Math.abs(c.diff) > sep.criticalDifference!);
      expect(c.df).toBe(20);
    }
  });

  it("adjusted p of a difference exactly equal to the HSD is α (q0.05(3, 12) table value)", () => {
    // Three treatments × five replicates: error df 12.
    const plots = ["P", "Q", "R"].flatMap((treatment, i) =>
      [0.3, -0.1, 0.4, -0.5, -0.1].map((e) => ({ treatment, value: 10 + i + e })),
    );
    const result = oneWayAnova(plots);
    const se = Math.sqrt((2 * rowOf(result.table, "residual").ms!) / 5);
    const hsd = (3.773 * se) / Math.SQRT2; // standard tables: q0.05(3, 12) = 3.773
    expect(separateMeans(result, "treatment").criticalDifference).toBeCloseTo(hsd, 3);
    expect(studentizedRangeUpperP((hsd / se) * Math.SQRT2, 3, 12)).toBeCloseTo(0.05, 4);
  });

  it("gives letters with 'a' for the highest mean, consistent with the pairwise tests", () => {
    const sep = separateMeans(rcbdAnova(rcbdFromRows(montgomeryEx41Rows)), "treatment");
    const group = Object.fromEntries(sep.means.map((m) => [m.label, m.group]));
    expect(group.T1).toContain("a"); // T1 has the highest mean in Montgomery Ex 4.1
    for (const c of sep.comparisons) {
      const share = [...group[c.a]].some((l) => group[c.b].includes(l));
      expect(share).toBe(!c.significant);
    }
  });
});

describe("Fisher's protected LSD", () => {
  const result = rcbdAnova(rcbdFromRows(montgomeryEx41Rows));
  const sep = separateMeans(result, "treatment", { method: "lsd" });

  it("LSD = t0.975,15·√(2·MSE/b) for Montgomery, DAE Example 4.1", () => {
    const mse = 109.886 / 15; // Montgomery, DAE Ex 4.1: SS error 109.886 on 15 df
    expect(sep.criticalDifference).toBeCloseTo(2.131 * Math.sqrt((2 * mse) / 6), 2); // standard tables: t0.975,15 = 2.131
    expect(sep.protectedByF).toBe(true); // Montgomery, DAE Ex 4.1: F = 8.107, P = 0.00192
  });

  it("letters: T1 a, T2 ab, T3 bc, T4 c (independent check: differences against the LSD from the t table)", () => {
    // Means 92.82, 91.68, 88.92, 85.77 and LSD 3.33: 1–3, 1–4 and 2–4 differ; 1–2, 2–3, 3–4 do not.
    expect(sep.means.map((m) => m.group)).toEqual(["a", "ab", "bc", "c"]);
  });

  it("declares no difference when the F test is not significant, and says so", () => {
    const flat = rcbdFromRows([
      [10.1, 11.0, 9.8, 10.5],
      [10.4, 10.7, 10.0, 10.2],
      [9.9, 11.2, 10.3, 10.4],
    ]);
    const sepFlat = separateMeans(rcbdAnova(flat), "treatment", { method: "lsd" });
    expect(sepFlat.protectedByF).toBe(false);
    expect(sepFlat.comparisons.every((c) => !c.significant)).toBe(true);
    expect(sepFlat.means.every((m) => m.group === "a")).toBe(true);
    expect(sepFlat.note).toMatch(/not significant/);
  });
});

describe("differences from the check", () => {
  it("use the same method and family as the pairwise table (signs: treatment − check)", () => {
    const result = rcbdAnova(rcbdFromRows(montgomeryEx41Rows));
    const vsCheck = compareWithCheck(result, "treatment", "T4");
    const all = separateMeans(result, "treatment").comparisons;
    expect(vsCheck.map((c) => c.a)).toEqual(["T1", "T2", "T3"]);
    for (const c of vsCheck) {
      const same = all.find((p) => (p.a === c.a && p.b === "T4") || (p.b === c.a && p.a === "T4"))!;
      expect(c.p).toBe(same.p);
      expect(Math.abs(c.diff)).toBeCloseTo(Math.abs(same.diff), 12);
      expect(c.b).toBe("T4");
      expect(c.diff).toBeGreaterThan(0);
      expect(c.lower).toBeLessThan(c.upper);
    }
    expect(() => compareWithCheck(result, "treatment", "control")).toThrow('the check "control" is not a level');
  });

  it("with one missing plot: SE = √(MSE·(2/b + t/(b(b − 1)(t − 1)))) (Gomez & Gomez 1984 missing-plot formula, independent check)", () => {
    const rows: (number | null)[][] = montgomeryEx41Rows.map((r) => [...r]);
    rows[0][2] = null;
    const result = rcbdAnova(rcbdFromRows(rows));
    const mse = 81.942 / 14; // DESIGN.md (Montgomery Ex 4.1 drop 98.2): SS error 81.942 on 14 df
    const [t, b] = [4, 6];
    const [withMissing] = compareWithCheck(result, "treatment", "T4", { method: "lsd" });
    expect(withMissing.a).toBe("T1");
    expect(withMissing.se).toBeCloseTo(Math.sqrt(mse * (2 / b + t / (b * (b - 1) * (t - 1)))), 3);
    expect(withMissing.df).toBe(14);
  });
});

describe("split-plot comparisons mixing strata", () => {
  const result = splitPlotAnova(montgomerySplitPlot, { block: "rep", main: ["method"], sub: ["temperature"] });
  const ea = 36.2778 / 4; // Montgomery split-plot: error(a) 36.28 on 4 df
  const eb = 71.5 / 18; // Montgomery split-plot: error(b) 71.50 on 18 df
  const [r, a, b] = [3, 3, 4];
  const cells = separateMeans(result, "method:temperature", { method: "lsd" }).comparisons;
  const find = (x: string, y: string) => cells.find((c) => c.a === x && c.b === y)!;

  it("main-plot means use error(a); sub-plot means use error(b) (Gomez & Gomez 1984 Table 3.11, independent check)", () => {
    const main = separateMeans(result, "method", { method: "lsd" }).comparisons[0];
    expect(main.se).toBeCloseTo(Math.sqrt((2 * ea) / (r * b)), 3);
    expect(main.df).toBe(4);
    const sub = separateMeans(result, "temperature", { method: "lsd" }).comparisons[0];
    expect(sub.se).toBeCloseTo(Math.sqrt((2 * eb) / (r * a)), 3);
    expect(sub.df).toBe(18);
  });

  it("two temperatures within one method: √(2E_b/r) on error(b) df", () => {
    const c = find("1:200", "1:225");
    expect(c.se).toBeCloseTo(Math.sqrt((2 * eb) / r), 3);
    expect(c.df).toBe(18);
  });

  it("two methods at one temperature: combined SE √(2[(b − 1)E_b + E_a]/(rb)) with Satterthwaite df", () => {
    const c = find("1:200", "2:200");
    const va = ea;
    const vb = (b - 1) * eb;
    expect(c.se).toBeCloseTo(Math.sqrt((2 * (vb + va)) / (r * b)), 3);
    // Satterthwaite 1946: ν = (Σv)²/Σ(v²/ν), with the parts (b − 1)E_b on 18 df and E_a on 4 df.
    expect(c.df).toBeCloseTo(((va + vb) ** 2) / (va ** 2 / 4 + vb ** 2 / 18), 2);
    expect(c.df).toBeGreaterThan(4);
    expect(c.df).toBeLessThan(18);
  });

  it("separates methods within each temperature as one family per temperature", () => {
    const within = separateMeansWithin(result, "method:temperature", "temperature", { method: "tukey" });
    expect(Object.keys(within)).toEqual(["200", "225", "250", "275"]);
    const at200 = within["200"];
    expect(at200.means.map((m) => m.label)).toEqual(["1:200", "2:200", "3:200"]);
    expect(at200.comparisons).toHaveLength(3);
    // Same SE as the full table (Gomez & Gomez combined SE), but Tukey's family is the 3 methods, not 12 cells.
    const c = at200.comparisons[0];
    expect(c.se).toBeCloseTo(find("1:200", "2:200").se, 12);
    expect(c.p).toBeLessThan(separateMeans(result, "method:temperature").comparisons.find((x) => x.a === "1:200" && x.b === "2:200")!.p);
    expect(() => separateMeansWithin(result, "method", "temperature")).toThrow("is not one of the factors");
  });

  it("satterthwaiteDf of one part is that part's df", () => {
    expect(satterthwaiteDf([{ variance: 2.5, df: 7 }])).toBe(7);
    expect(satterthwaiteDf([{ variance: 1, df: 10 }, { variance: 1, df: 10 }])).toBeCloseTo(20, 12);
  });
});

describe("compact letter display (Piepho 2004 insert-and-absorb)", () => {
  it("gives every mean 'a' when nothing differs, and separate letters when everything does", () => {
    expect(compactLetterDisplay([3, 2, 1], () => false)).toEqual(["a", "a", "a"]);
    expect(compactLetterDisplay([1, 3, 2], () => true)).toEqual(["c", "a", "b"]);
  });

  it("two means share a letter exactly when they do not differ (brute-force check on 300 random patterns)", () => {
    let seed = 12345;
    const next = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    for (let draw = 0; draw < 300; draw++) {
      const k = 2 + Math.floor(next() * 8);
      const means = Array.from({ length: k }, () => next() * 100);
      const differs = new Set<string>();
      for (let i = 0; i < k; i++) for (let j = i + 1; j < k; j++) if (next() < 0.5) differs.add(`${i},${j}`);
      const letters = compactLetterDisplay(means, (i, j) => differs.has(`${i},${j}`));
      for (let i = 0; i < k; i++) {
        expect(letters[i].length).toBeGreaterThan(0);
        for (let j = i + 1; j < k; j++) {
          const share = [...letters[i]].some((l) => letters[j].includes(l));
          expect(share).toBe(!differs.has(`${i},${j}`));
        }
      }
      const highest = means.indexOf(Math.max(...means));
      expect(letters[highest]).toContain("a");
    }
  });
});
