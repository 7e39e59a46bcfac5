import { describe, expect, it } from "vitest";
import {
  lossOnIgnitionFlag,
  lossOnIgnitionPercent,
  MeasurementError,
  somPercentFromLoi,
  socPercentFromSom,
  PRIBYL_FACTOR,
} from "../../../analysis/soil";

describe("lossOnIgnitionPercent", () => {
  it("reproduces the worked check", () => {
    // Heiri, Lotter & Lemcke 2001 method; worked check from DESIGN.md:
    // crucible 20.000 g, + dry soil 30.000 g, + ignited 29.500 g → LOI 5.00 %
    const loi = lossOnIgnitionPercent({ crucibleG: 20.0, crucibleDrySoilG: 30.0, crucibleResidueG: 29.5 });
    expect(loi).toBeCloseTo(5.0, 10);
  });

  it("computes (dry − ash)/dry on another hand-worked case", () => {
    // Hand calculation: dry = 35.250 − 25.100 = 10.150 g; ash = 34.640 − 25.100 = 9.540 g;
    // LOI = (10.150 − 9.540) / 10.150 × 100 = 6.0099 %
    const loi = lossOnIgnitionPercent({ crucibleG: 25.1, crucibleDrySoilG: 35.25, crucibleResidueG: 34.64 });
    expect(loi).toBeCloseTo(6.0099, 4);
  });

  it("rejects ash heavier than the dry soil, naming the residue column", () => {
    // DESIGN.md: reject ash > dry
    const call = () => lossOnIgnitionPercent({ crucibleG: 20, crucibleDrySoilG: 30, crucibleResidueG: 30.2 });
    expect(call).toThrow(MeasurementError);
    expect(call).toThrow(/heavier than the oven-dry soil/);
    try {
      call();
    } catch (e) {
      expect((e as MeasurementError).field).toBe("crucibleResidueG");
    }
  });

  it("rejects a dry mass of zero or less", () => {
    // DESIGN.md: reject dry ≤ 0
    expect(() => lossOnIgnitionPercent({ crucibleG: 20, crucibleDrySoilG: 20, crucibleResidueG: 20 })).toThrow(
      /must be heavier/,
    );
    expect(() => lossOnIgnitionPercent({ crucibleG: 20, crucibleDrySoilG: 19, crucibleResidueG: 19 })).toThrow(
      /must be heavier/,
    );
  });

  it("rejects non-numeric weighings", () => {
    expect(() => lossOnIgnitionPercent({ crucibleG: Number.NaN, crucibleDrySoilG: 30, crucibleResidueG: 29 })).toThrow(
      /must be a number/,
    );
  });
});

describe("lossOnIgnitionFlag", () => {
  it("warns above 40 % (threshold from issue 4, mineral soils)", () => {
    expect(lossOnIgnitionFlag(5).status).toBe("ok");
    expect(lossOnIgnitionFlag(40).status).toBe("ok");
    const flag = lossOnIgnitionFlag(40.1);
    expect(flag.status).toBe("warning");
    expect(flag.status === "warning" && flag.message).toMatch(/unusual for a mineral soil/);
  });
});

describe("somPercentFromLoi and socPercentFromSom", () => {
  it("takes SOM = LOI when no calibration is set", () => {
    // DESIGN.md: SOM = LOI, or a lab calibration
    expect(somPercentFromLoi(5)).toBe(5);
  });

  it("applies a lab calibration a·LOI + b", () => {
    // Hand calculation: 0.9 × 5.00 − 0.5 = 4.00
    expect(somPercentFromLoi(5, { slope: 0.9, intercept: -0.5 })).toBeCloseTo(4.0, 10);
  });

  it("refuses a calibration that gives negative SOM", () => {
    expect(() => somPercentFromLoi(0.2, { slope: 1, intercept: -0.5 })).toThrow(/negative SOM/);
  });

  it("gives 2.90 % SOC from 5.00 % SOM with the van Bemmelen factor", () => {
    // Nelson & Sommers 1996 factor 1.724; worked check from DESIGN.md: 5.00 % SOM → 2.90 % SOC
    expect(socPercentFromSom(5)).toBeCloseTo(2.9, 2);
  });

  it("gives 2.50 % SOC from 5.00 % SOM with Pribyl's factor 2.0", () => {
    // Pribyl 2010 factor 2.0; hand calculation 5.00 / 2.0 = 2.50
    expect(socPercentFromSom(5, PRIBYL_FACTOR)).toBeCloseTo(2.5, 10);
  });
});
