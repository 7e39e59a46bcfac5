import { describe, expect, it } from "vitest";
import {
  asIsKgPerPlot,
  blendCnRatio,
  cnRatio,
  dryMassKgFromAsIs,
  elementAppliedKgPerHa,
} from "../../../analysis/amendments";

describe("asIsKgPerPlot", () => {
  it("gives 29.03 kg for 10 Mg DM/ha on 18 m² at 38 % moisture", () => {
    // Worked check from DESIGN.md: 10 × 1000 × 18 / 10 000 / (1 − 0.38) = 18 / 0.62 = 29.03 kg
    expect(asIsKgPerPlot(10, 18, 38)).toBeCloseTo(29.03, 2);
  });

  it("equals the dry mass when the amendment is bone dry", () => {
    // Hand calculation: 20 Mg/ha × 1000 × 24 m² / 10 000 = 48.0 kg
    expect(asIsKgPerPlot(20, 24, 0)).toBeCloseTo(48, 10);
  });

  it("refuses moisture of 100 % or more, or below 0", () => {
    expect(() => asIsKgPerPlot(10, 18, 100)).toThrow(/below 100 %/);
    expect(() => asIsKgPerPlot(10, 18, -1)).toThrow(/at least 0 %/);
    expect(() => asIsKgPerPlot(10, 0, 38)).toThrow(/Plot area/);
  });
});

describe("dryMassKgFromAsIs", () => {
  it("inverts the as-is calculation", () => {
    // Definition of wet-basis moisture: 29.032 kg × (1 − 0.38) = 18.0 kg dry (DESIGN.md worked check reversed)
    expect(dryMassKgFromAsIs(asIsKgPerPlot(10, 18, 38), 38)).toBeCloseTo(18, 10);
  });
});

describe("elementAppliedKgPerHa", () => {
  it("C and N applied on a dry basis", () => {
    // Hand calculation: 20 Mg DM/ha = 20 000 kg DM/ha; × 30 % C = 6000 kg C/ha; × 1.5 % N = 300 kg N/ha
    expect(elementAppliedKgPerHa(20, 30)).toBeCloseTo(6000, 9);
    expect(elementAppliedKgPerHa(20, 1.5)).toBeCloseTo(300, 9);
  });

  it("refuses a concentration above 100 %", () => {
    expect(() => elementAppliedKgPerHa(20, 130)).toThrow(/cannot exceed 100 %/);
  });
});

describe("C:N", () => {
  it("is total C over total N", () => {
    // Hand calculation: 30 % C / 1.5 % N = 20
    expect(cnRatio(30, 1.5)).toBeCloseTo(20, 12);
    expect(() => cnRatio(30, 0)).toThrow(/more than 0/);
  });

  it("blends by dry mass, not by averaging ratios", () => {
    // Hand calculation written out (DESIGN.md formula Σ mᵢCᵢ / Σ mᵢNᵢ):
    //   leaf mould     100 kg dry, 40 % C, 0.8 % N → 40.0 kg C, 0.80 kg N (C:N 50)
    //   coffee grounds  50 kg dry, 50 % C, 2.2 % N → 25.0 kg C, 1.10 kg N (C:N 22.7)
    //   blend C:N = (40.0 + 25.0) / (0.80 + 1.10) = 65.0 / 1.90 = 34.21
    // A mass-weighted mean of the two ratios would give (100·50 + 50·22.73)/150 = 40.9 — wrong.
    const blend = blendCnRatio([
      { dryMass: 100, carbonPercentDry: 40, nitrogenPercentDry: 0.8 },
      { dryMass: 50, carbonPercentDry: 50, nitrogenPercentDry: 2.2 },
    ]);
    expect(blend).toBeCloseTo(34.21, 2);
    expect(blend).not.toBeCloseTo(40.9, 0);
  });

  it("a single batch blends to its own ratio", () => {
    expect(blendCnRatio([{ dryMass: 7, carbonPercentDry: 30, nitrogenPercentDry: 1.5 }])).toBeCloseTo(
      cnRatio(30, 1.5),
      12,
    );
  });

  it("refuses an empty or nitrogen-free blend", () => {
    expect(() => blendCnRatio([])).toThrow(/at least one batch/);
    expect(() => blendCnRatio([{ dryMass: 10, carbonPercentDry: 45, nitrogenPercentDry: 0 }])).toThrow(/no nitrogen/);
    expect(() => blendCnRatio([{ dryMass: -1, carbonPercentDry: 45, nitrogenPercentDry: 1 }])).toThrow(
      /Batch 1: dry mass/,
    );
  });
});
