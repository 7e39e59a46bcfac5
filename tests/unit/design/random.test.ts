import { describe, expect, it } from "vitest";
import jStat from "jstat";
import { assertSeed, drawSeed, mulberry32, shuffled } from "../../../analysis/design";

/**
 * An independent re-implementation of the reference C code of Mulberry32 (Tommy Ettinger, 2017) in exact
 * BigInt arithmetic modulo 2³², so a slip in the Math.imul / >>> version would show:
 *   z = (state += 0x6D2B79F5); z = (z ^ (z >> 15)) * (z | 1); z ^= z + (z ^ (z >> 7)) * (z | 61); return z ^ (z >> 14);
 */
function referenceMulberry32(seed: number, count: number): number[] {
  const MASK = 0xffffffffn;
  let state = BigInt(seed);
  const out: number[] = [];
  for (let i = 0; i < count; i++) {
    state = (state + 0x6d2b79f5n) & MASK;
    let z = state;
    z = ((z ^ (z >> 15n)) * (z | 1n)) & MASK;
    z = (z ^ ((z + (((z ^ (z >> 7n)) * (z | 61n)) & MASK)) & MASK)) & MASK;
    out.push(Number(z ^ (z >> 14n)) / 2 ** 32);
  }
  return out;
}

describe("mulberry32", () => {
  it.each([0, 1, 42, 20_250_601, 0xffffffff])("matches the reference algorithm for seed %i", (seed) => {
    const random = mulberry32(seed);
    const ours = Array.from({ length: 1000 }, () => random());
    expect(ours).toEqual(referenceMulberry32(seed, 1000));
  });

  it("gives the same stream for the same seed and a different one for another seed", () => {
    const a = mulberry32(7);
    const b = mulberry32(7);
    const c = mulberry32(8);
    const sa = Array.from({ length: 20 }, () => a());
    expect(Array.from({ length: 20 }, () => b())).toEqual(sa);
    expect(Array.from({ length: 20 }, () => c())).not.toEqual(sa);
  });

  it("is uniform on [0, 1) by a χ² test over 20 bins", () => {
    // Pearson χ² goodness of fit, df = 19, α = 0.001 (jstat chisquare)
    const random = mulberry32(12_345);
    const bins = new Array(20).fill(0);
    const n = 100_000;
    let lowest = 1;
    let highest = 0;
    for (let i = 0; i < n; i++) {
      const u = random();
      lowest = Math.min(lowest, u);
      highest = Math.max(highest, u);
      bins[Math.floor(u * 20)]++;
    }
    expect(lowest).toBeGreaterThanOrEqual(0);
    expect(highest).toBeLessThan(1);
    const expected = n / 20;
    const chi2 = bins.reduce((s, o) => s + (o - expected) ** 2 / expected, 0);
    expect(1 - jStat.chisquare.cdf(chi2, 19)).toBeGreaterThan(0.001);
  });

  it("accepts only 32-bit unsigned integer seeds", () => {
    expect(() => assertSeed(-1)).toThrow(/whole number from 0 to 4294967295/);
    expect(() => assertSeed(2 ** 32)).toThrow(RangeError);
    expect(() => mulberry32(1.5)).toThrow(RangeError);
    const seed = drawSeed();
    expect(() => assertSeed(seed)).not.toThrow();
  });
});

describe("shuffled (Fisher–Yates)", () => {
  it("returns a permutation and leaves the input alone", () => {
    const input = ["a", "b", "c", "d", "e", "f"];
    const out = shuffled(input, mulberry32(3));
    expect([...out].sort()).toEqual(input);
    expect(input).toEqual(["a", "b", "c", "d", "e", "f"]);
  });

  it("makes all 3! = 6 orders of three items about equally often", () => {
    // Durstenfeld 1964: each permutation has probability 1/n!; Pearson χ², df = 5, α = 0.001 (jstat chisquare)
    const random = mulberry32(99);
    const counts = new Map<string, number>();
    const n = 60_000;
    for (let i = 0; i < n; i++) {
      const key = shuffled([1, 2, 3], random).join("");
      counts.set(key, (counts.get(key) ?? 0) + 1);
    }
    expect(counts.size).toBe(6);
    const expected = n / 6;
    const chi2 = [...counts.values()].reduce((s, o) => s + (o - expected) ** 2 / expected, 0);
    expect(1 - jStat.chisquare.cdf(chi2, 5)).toBeGreaterThan(0.001);
  });
});
