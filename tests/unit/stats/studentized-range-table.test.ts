import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { mulberry32 } from "../../../analysis/design/random";
import { studentizedRangeQuantile, studentizedRangeUpperP } from "../../../analysis/stats";
import {
  studentizedRangeQuantileTabulated,
  studentizedRangeUpperPDirect,
  studentizedRangeUpperPTabulated,
} from "../../../analysis/stats/studentized-range-table";

// The table is judged against the direct jstat call it replaces. Stated tolerance:
// |P_table − P_jstat| ≤ 1e-6, and within 1e-4 relative wherever P_jstat > 1e-5 (further out,
// jstat's own integration noise, about 1e-10 absolute, is a larger share of P).
const ABSOLUTE = 1e-6;
const RELATIVE = 1e-4;

const cases: [nMeans: number, df: number][] = [
  [2, 4],
  [3, 12],
  [4, 20],
  [5, 2],
  [5, 12],
  [8, 30.7], // Satterthwaite df are not whole numbers
  [12, 60],
  [24, 115],
  [24, 300],
  [40, 1000],
];

describe("studentized range from a table of jstat's values", () => {
  // Each direct jstat call costs about half a millisecond: allow for a busy machine.
  it(`agrees with direct jstat calls to ${ABSOLUTE} absolute, ${RELATIVE} relative, over q from 0.05 to 30, k 2–40, df 2–1000`, { timeout: 60_000 }, () => {
    const random = mulberry32(20250501);
    for (const [k, df] of cases) {
      // Random points (not nodes) across the body and both tails, on a log scale.
      for (let n = 0; n < 40; n++) {
        const q = Math.exp(Math.log(0.05) + random() * Math.log(30 / 0.05));
        const direct = studentizedRangeUpperPDirect(q, k, df);
        const tabulated = studentizedRangeUpperPTabulated(q, k, df);
        const error = Math.abs(tabulated - direct);
        expect(error, `q = ${q}, k = ${k}, df = ${df}`).toBeLessThanOrEqual(ABSOLUTE);
        if (direct > 1e-5) expect(error / direct, `q = ${q}, k = ${k}, df = ${df}`).toBeLessThanOrEqual(RELATIVE);
      }
    }
  });

  it("never increases with q (monotone interpolation)", () => {
    for (const [k, df] of [[3, 12], [24, 115]] as const) {
      let previous = 1;
      for (let q = 0.01; q < 20; q *= 1.013) {
        const p = studentizedRangeUpperPTabulated(q, k, df);
        expect(p).toBeLessThanOrEqual(previous);
        previous = p;
      }
    }
  });

  it("still gives α at the published critical values", () => {
    expect(studentizedRangeUpperP(3.773, 3, 12)).toBeCloseTo(0.05, 4); // standard tables: q0.05(3, 12) = 3.773
    expect(studentizedRangeUpperP(3.958, 4, 20)).toBeCloseTo(0.05, 4); // standard tables: q0.05(4, 20) = 3.958
    expect(studentizedRangeUpperP(4.508, 5, 12)).toBeCloseTo(0.05, 4); // standard tables: q0.05(5, 12) = 4.508
    expect(studentizedRangeQuantile(0.95, 3, 12)).toBeCloseTo(3.773, 3); // standard tables: q0.05(3, 12) = 3.773
    expect(studentizedRangeQuantile(0.95, 4, 20)).toBeCloseTo(3.958, 3); // standard tables: q0.05(4, 20) = 3.958
    expect(studentizedRangeQuantile(0.95, 5, 12)).toBeCloseTo(4.508, 3); // standard tables: q0.05(5, 12) = 4.508
  });

  it("gives the value of the first call whatever was asked before (lattice nodes, not call order)", () => {
    const q = 3.3;
    const fresh = studentizedRangeUpperPTabulated(q, 7, 41.5);
    for (let x = 0.2; x < 12; x += 0.37) studentizedRangeUpperPTabulated(x, 7, 41.5);
    expect(studentizedRangeUpperPTabulated(q, 7, 41.5)).toBe(fresh);
  });

  it("handles the ends: q ≤ 0 gives 1, a huge q gives (almost) 0, bad parameters give NaN", () => {
    expect(studentizedRangeUpperPTabulated(0, 4, 20)).toBe(1);
    expect(studentizedRangeUpperPTabulated(1e-6, 24, 115)).toBe(1);
    expect(studentizedRangeUpperPTabulated(200, 4, 20)).toBeLessThan(1e-9);
    expect(studentizedRangeUpperPTabulated(3, 1, 20)).toBeNaN();
    expect(studentizedRangeUpperPTabulated(3, 4, 0)).toBeNaN();
  });
});

describe("studentized-range quantile from the same table", () => {
  it("agrees with jstat's tukey.inv to its own tolerance (1e-4 in q) and inverts the table's p exactly", { timeout: 60_000 }, () => {
    for (const [k, df] of cases) {
      for (const p of [0.9, 0.95, 0.99]) {
        const q = studentizedRangeQuantileTabulated(p, k, df);
        expect(Math.abs(q - jStat.tukey.inv(p, k, df)), `p = ${p}, k = ${k}, df = ${df}`).toBeLessThan(2e-4);
        expect(studentizedRangeUpperPTabulated(q, k, df)).toBeCloseTo(1 - p, 12);
      }
    }
  });
});
