import { describe, expect, it } from "vitest";
import {
  cumulativeSocProfile,
  esmReferenceMassMgPerHa,
  fritschCarlsonTangents,
  socStockEsmMgPerHa,
  socStockMgPerHa,
  type CoreIncrement,
} from "../../../analysis/soil";
import { mulberry32 } from "../../../analysis/design/random";

// Worked example from DESIGN.md (Ellert & Bettany 1995 method): 0–10/10–20/20–30 cm,
// BD 1.20/1.30/1.40 g/cm³, SOC 2.0/1.5/1.0 %
const worked: CoreIncrement[] = [
  { topCm: 0, bottomCm: 10, bdFineGPerCm3: 1.2, socPercent: 2.0 },
  { topCm: 10, bottomCm: 20, bdFineGPerCm3: 1.3, socPercent: 1.5 },
  { topCm: 20, bottomCm: 30, bdFineGPerCm3: 1.4, socPercent: 1.0 },
];

describe("socStockMgPerHa (fixed depth)", () => {
  it("gives 78 Mg C/ha for 2 % SOC, BD 1.3, 30 cm", () => {
    // Worked check from DESIGN.md: 2 % × 1.3 × 30 = 78 Mg C/ha
    expect(socStockMgPerHa(2, 1.3, 30)).toBeCloseTo(78, 10);
  });
});

describe("cumulativeSocProfile", () => {
  it("accumulates fine-earth mass and SOC from the surface", () => {
    // Ellert & Bettany 1995 method; worked example from DESIGN.md: M = 1200/2500/3900, C = 24/43.5/57.5
    const rows = cumulativeSocProfile(worked);
    expect(rows.map((r) => r.cumulativeMassMgPerHa)).toEqual([1200, 2500, 3900].map((x) => expect.closeTo(x, 9)));
    expect(rows.map((r) => r.cumulativeSocStockMgPerHa)).toEqual([24, 43.5, 57.5].map((x) => expect.closeTo(x, 9)));
    // per increment, hand calculation: 1.3 × 10 × 100 = 1300 Mg/ha; 1.5 % of 1300 = 19.5 Mg C/ha
    expect(rows[1].fineEarthMassMgPerHa).toBeCloseTo(1300, 9);
    expect(rows[1].socStockMgPerHa).toBeCloseTo(19.5, 9);
  });

  it("refuses increments with a gap", () => {
    expect(() => cumulativeSocProfile([worked[0], worked[2]])).toThrow(/Gap between/);
  });
});

describe("esmReferenceMassMgPerHa", () => {
  it("is the smallest deepest-cumulative mass over all cores", () => {
    // DESIGN.md default rule. Second core, hand calculation: 1.1×10×100 + 1.2×10×100 + 1.3×10×100 = 3600 Mg/ha
    const lighter = worked.map((d, i) => ({ ...d, bdFineGPerCm3: [1.1, 1.2, 1.3][i] }));
    expect(esmReferenceMassMgPerHa([worked, lighter])).toBeCloseTo(3600, 9);
    expect(esmReferenceMassMgPerHa([worked])).toBeCloseTo(3900, 9);
  });
});

describe("socStockEsmMgPerHa", () => {
  it("linear: 55.0 Mg C/ha at a reference mass of 3650 Mg/ha", () => {
    // Ellert & Bettany 1995 method; worked example from DESIGN.md: 43.5 + (1150/1400)·14 = 55.0 Mg C/ha
    expect(socStockEsmMgPerHa(worked, 3650)).toBeCloseTo(55.0, 10);
  });

  it("linear: interpolates inside the first increment from (0, 0)", () => {
    // Hand calculation: at 600 Mg/ha, half of the first increment: 24 × 600/1200 = 12 Mg C/ha
    expect(socStockEsmMgPerHa(worked, 600)).toBeCloseTo(12, 10);
  });

  it("equals the fixed-depth cumulative stock when the reference is the core's own full mass", () => {
    // Consistency (Ellert & Bettany 1995): at M_ref = M_n both methods give C_n = 57.5
    expect(socStockEsmMgPerHa(worked, 3900)).toBeCloseTo(57.5, 10);
    expect(socStockEsmMgPerHa(worked, 3900, { interpolation: "cubic" })).toBeCloseTo(57.5, 10);
  });

  it("cubic (Fritsch–Carlson) at 3650 Mg/ha matches a hand computation", () => {
    // Fritsch & Carlson 1980, hand computation written out:
    // knots x = 0, 1200, 2500, 3900; y = 0, 24, 43.5, 57.5
    // secants δ = 0.02, 0.015, 0.01
    // tangents m0 = δ0 = 0.02; m1 = (0.02+0.015)/2 = 0.0175; m2 = (0.015+0.01)/2 = 0.0125; m3 = δ2 = 0.01
    // α²+β² on each interval ≤ 9 (largest: (1.25)² + 1² = 2.5625), so no rescaling.
    // interval 2: h = 1400, t = 1150/1400 = 0.821428571
    // h00 = 2t³−3t²+1 = 0.084274781; h10 = t³−2t²+t = 0.026193513
    // h01 = −2t³+3t² = 0.915725219; h11 = t³−t² = −0.120490160
    // C = 0.084274781·43.5 + 0.026193513·1400·0.0125 + 0.915725219·57.5 − 0.120490160·1400·0.01
    //   = 3.665953 + 0.458386 + 52.654200 − 1.686862 = 55.0917 Mg C/ha
    expect(fritschCarlsonTangents([0, 1200, 2500, 3900], [0, 24, 43.5, 57.5])).toEqual(
      [0.02, 0.0175, 0.0125, 0.01].map((m) => expect.closeTo(m, 12)),
    );
    expect(socStockEsmMgPerHa(worked, 3650, { interpolation: "cubic" })).toBeCloseTo(55.0917, 3);
  });

  it("cubic rescales tangents when α² + β² > 9", () => {
    // Fritsch & Carlson 1980 step 5, hand computation: x = 0,1,2,3; y = 0,0.1,5,5.1
    // δ = 0.1, 4.9, 0.1; initial m = 0.1, 2.5, 2.5, 0.1
    // interval 0: α = 1, β = 25 → α²+β² = 626 > 9, τ = 3/√626 = 0.119904; m0 = 0.0119904, m1 = 0.299760
    // interval 1: α = 0.29976/4.9 = 0.061176, β = 2.5/4.9 = 0.510204 → 0.264 ≤ 9, unchanged
    // interval 2: α = 25, β = 1 → τ = 0.119904; m2 = 0.299760, m3 = 0.0119904
    const m = fritschCarlsonTangents([0, 1, 2, 3], [0, 0.1, 5, 5.1]);
    expect(m).toEqual([0.0119904, 0.29976, 0.29976, 0.0119904].map((v) => expect.closeTo(v, 5)));
  });

  it("cubic equals linear when the data lie on a line (uniform SOC % and BD)", () => {
    // Property of Hermite interpolation with Fritsch–Carlson tangents: collinear knots give the line itself.
    // Hand calculation: 1.5 % SOC throughout → C = 0.015 × M; at 2000 Mg/ha C = 30 Mg C/ha
    const uniform = worked.map((d) => ({ ...d, bdFineGPerCm3: 1.25, socPercent: 1.5 }));
    expect(socStockEsmMgPerHa(uniform, 2000, { interpolation: "cubic" })).toBeCloseTo(30, 10);
    expect(socStockEsmMgPerHa(uniform, 2000)).toBeCloseTo(30, 10);
  });

  it("cubic is monotone: cumulative SOC never decreases with mass (Fritsch & Carlson 1980, theorem)", () => {
    const random = mulberry32(20_240_611);
    for (let core = 0; core < 100; core++) {
      const increments: CoreIncrement[] = [0, 10, 20, 30, 50].map((top, i, tops) => ({
        topCm: top,
        bottomCm: tops[i + 1] ?? 80,
        bdFineGPerCm3: 0.8 + random() * 0.9,
        // occasional zero SOC layer makes flat segments, the hard case for cubic splines
        socPercent: random() < 0.2 ? 0 : random() * 5,
      }));
      const deepest = cumulativeSocProfile(increments).at(-1)!.cumulativeMassMgPerHa;
      let previous = 0;
      for (let step = 1; step <= 60; step++) {
        const c = socStockEsmMgPerHa(increments, (deepest * step) / 60, { interpolation: "cubic" });
        expect(c).toBeGreaterThanOrEqual(previous - 1e-9);
        previous = c;
      }
    }
  });

  it("throws clearly when the reference mass is beyond the core's data", () => {
    // 3900 Mg/ha is this core's deepest cumulative mass (DESIGN.md worked example)
    expect(() => socStockEsmMgPerHa(worked, 4000, { coreLabel: "Plot 203, 2026 fall" })).toThrow(
      /Plot 203, 2026 fall reaches 3900\.0 Mg\/ha .* at 30 cm, less than the reference mass 4000\.0 Mg\/ha.*extrapolation/,
    );
  });

  it("cubic needs at least 3 increments", () => {
    // DESIGN.md: monotone cubic "with ≥ 3 increments"
    expect(() => socStockEsmMgPerHa(worked.slice(0, 2), 2000, { interpolation: "cubic" })).toThrow(/needs at least 3/);
    expect(socStockEsmMgPerHa(worked.slice(0, 2), 2000)).toBeGreaterThan(0);
  });

  it("refuses an increment without fine earth", () => {
    const stony = worked.map((d, i) => (i === 1 ? { ...d, bdFineGPerCm3: 0 } : d));
    expect(() => socStockEsmMgPerHa(stony, 1000)).toThrow(/10–20 cm has no fine-earth mass/);
  });

  it("uniform compression: the ESM stock stays, the fixed-depth stock changes (issue 5 check)", () => {
    // The same soil before and after being compressed by 1.5 (e.g. by traffic): carbon per unit
    // mass is 2 % for the first 3000 Mg/ha of fine earth and 1 % below, in both cores.
    // Loose: BD 1.0, six 10-cm increments → cumulative mass 1000 … 6000 Mg/ha.
    const loose: CoreIncrement[] = [0, 10, 20, 30, 40, 50].map((top) => ({
      topCm: top,
      bottomCm: top + 10,
      bdFineGPerCm3: 1.0,
      socPercent: top < 30 ? 2 : 1,
    }));
    // Compressed: BD 1.5, three 10-cm increments → 1500, 3000, 4500 Mg/ha, at the same 2 % / 1 %.
    const compressed: CoreIncrement[] = [0, 10, 20].map((top) => ({
      topCm: top,
      bottomCm: top + 10,
      bdFineGPerCm3: 1.5,
      socPercent: top < 20 ? 2 : 1,
    }));
    const reference = esmReferenceMassMgPerHa([loose, compressed]);
    expect(reference).toBeCloseTo(4500, 9); // hand calculation: min(6000, 1.5 × 10 × 100 × 3) = 4500 Mg/ha
    // Hand calculation, both cores: 3000 Mg/ha × 2 % + 1500 Mg/ha × 1 % = 60 + 15 = 75 Mg C/ha.
    // (The kink of C(M) at 3000 Mg/ha is a knot of both cores, so linear interpolation is exact.)
    expect(socStockEsmMgPerHa(loose, reference)).toBeCloseTo(75, 10);
    expect(socStockEsmMgPerHa(compressed, reference)).toBeCloseTo(75, 10);
    // Fixed depth 0–30 cm, hand calculation: loose 3 × 2 % × 1.0 × 10 = 60; compressed 2 × 2 % × 1.5 × 10 + 1 % × 1.5 × 10 = 75.
    const fixed30 = (core: CoreIncrement[]) => cumulativeSocProfile(core).find((r) => r.bottomCm === 30)!.cumulativeSocStockMgPerHa;
    expect(fixed30(loose)).toBeCloseTo(60, 10);
    expect(fixed30(compressed)).toBeCloseTo(75, 10);
  });

  it("uniform compression with SOC uniform by mass: linear and cubic ESM both unchanged", () => {
    // 1.2 % by mass throughout; compression by 1.3 raises BD 1.1 → 1.43. Hand calculation at the
    // reference mass 3300 Mg/ha (the loose core's 0–30 cm): 1.2 % × 3300 = 39.6 Mg C/ha.
    const core = (bd: number): CoreIncrement[] =>
      [0, 10, 20].map((top) => ({ topCm: top, bottomCm: top + 10, bdFineGPerCm3: bd, socPercent: 1.2 }));
    for (const interpolation of ["linear", "cubic"] as const) {
      expect(socStockEsmMgPerHa(core(1.1), 3300, { interpolation })).toBeCloseTo(39.6, 9);
      expect(socStockEsmMgPerHa(core(1.43), 3300, { interpolation })).toBeCloseTo(39.6, 9);
    }
    // Fixed depth 0–30 cm changes by the compression factor: 39.6 → 1.2 × 1.43 × 30 = 51.48 Mg C/ha.
    expect(cumulativeSocProfile(core(1.43)).at(-1)!.cumulativeSocStockMgPerHa).toBeCloseTo(51.48, 9);
  });
});
