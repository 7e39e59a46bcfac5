import { describe, expect, it } from "vitest";
import {
  bulkDensityFlag,
  coreVolumeCm3,
  fineEarthBulkDensity,
  gravimetricMoisturePercentDryBasis,
  MeasurementError,
  wholeCoreBulkDensity,
} from "../../../analysis/soil";
import { inchesToCm } from "../../../analysis/units";

describe("coreVolumeCm3", () => {
  it("gives 347.5 cm³ for a 3-inch ring driven 3 inches", () => {
    // Blake & Hartge 1986 core method; worked check from DESIGN.md: V = π·3.81²·7.62 = 347.5 cm³
    const v = coreVolumeCm3({ diameterCm: inchesToCm(3), heightCm: inchesToCm(3) });
    expect(v).toBeCloseTo(347.5, 1);
  });

  it("uses a stated volume when no dimensions are given", () => {
    expect(coreVolumeCm3({ volumeCm3: 100 })).toBe(100);
  });

  it("accepts dimensions and volume that agree, refuses ones that do not", () => {
    expect(coreVolumeCm3({ diameterCm: 7.62, heightCm: 7.62, volumeCm3: 347.5 })).toBe(347.5);
    expect(() => coreVolumeCm3({ diameterCm: 7.62, heightCm: 7.62, volumeCm3: 300 })).toThrow(
      /347\.5 cm³ but the volume column says 300/,
    );
  });

  it("asks for both dimensions or a volume", () => {
    expect(() => coreVolumeCm3({ diameterCm: 5 })).toThrow(/both the core diameter and the core height/);
    expect(() => coreVolumeCm3({})).toThrow(/needs a volume/);
    expect(() => coreVolumeCm3({ diameterCm: 5, heightCm: -1 })).toThrow(MeasurementError);
  });
});

describe("bulk density", () => {
  it("whole-core BD = oven-dry mass / volume", () => {
    // Hand calculation: 450.0 g / 347.5 cm³ = 1.2950 g/cm³
    expect(wholeCoreBulkDensity(450, 347.5)).toBeCloseTo(1.295, 4);
  });

  it("fine-earth BD subtracts coarse fragments but keeps the total volume", () => {
    // Poeplau, Vos & Don 2017 definition; hand calculation written out:
    // core 480.0 g oven-dry, of which 60.0 g stones > 2 mm, volume 347.5 cm³
    // BD_fine = (480.0 − 60.0) / 347.5 = 420.0 / 347.5 = 1.2086 g/cm³ (whole core: 480/347.5 = 1.3813)
    expect(fineEarthBulkDensity(480, 60, 347.5)).toBeCloseTo(1.2086, 4);
    expect(wholeCoreBulkDensity(480, 347.5)).toBeCloseTo(1.3813, 4);
  });

  it("with no coarse fragments fine-earth BD equals whole-core BD", () => {
    expect(fineEarthBulkDensity(450, 0, 347.5)).toBe(wholeCoreBulkDensity(450, 347.5));
  });

  it("refuses coarse fragments heavier than the core", () => {
    expect(() => fineEarthBulkDensity(100, 120, 347.5)).toThrow(/weigh more than the whole oven-dry core/);
    expect(() => fineEarthBulkDensity(100, -1, 347.5)).toThrow(/cannot be negative/);
  });
});

describe("bulkDensityFlag", () => {
  // Thresholds from DESIGN.md: warn outside 0.5–2.0 g/cm³, reject ≥ 2.65 (quartz particle density, common practice)
  it("passes typical mineral-soil values", () => {
    expect(bulkDensityFlag(1.3).status).toBe("ok");
    expect(bulkDensityFlag(0.5).status).toBe("ok");
    expect(bulkDensityFlag(2.0).status).toBe("ok");
  });

  it("warns outside 0.5–2.0", () => {
    expect(bulkDensityFlag(0.49).status).toBe("warning");
    expect(bulkDensityFlag(2.01).status).toBe("warning");
    expect(bulkDensityFlag(2.64).status).toBe("warning");
  });

  it("rejects 2.65 and above, and non-positive values", () => {
    const flag = bulkDensityFlag(2.65);
    expect(flag.status).toBe("error");
    expect(flag.status === "error" && flag.message).toMatch(/density of quartz/);
    expect(bulkDensityFlag(3.1).status).toBe("error");
    expect(bulkDensityFlag(0).status).toBe("error");
  });
});

describe("gravimetricMoisturePercentDryBasis", () => {
  it("is water over dry mass", () => {
    // Hand calculation (dry basis, DESIGN.md): (125.0 − 100.0) / 100.0 × 100 = 25.0 %
    expect(gravimetricMoisturePercentDryBasis(125, 100)).toBeCloseTo(25, 10);
    // Dry basis differs from wet basis: the same sample is 25/125 = 20 % on a wet basis
    expect(gravimetricMoisturePercentDryBasis(125, 100)).not.toBeCloseTo(20, 1);
  });

  it("refuses a wet mass below the dry mass", () => {
    expect(() => gravimetricMoisturePercentDryBasis(90, 100)).toThrow(/drying cannot add mass/);
  });
});
