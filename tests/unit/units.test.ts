import { describe, expect, it } from "vitest";
import {
  acreInchesToUsGallons,
  acresToHectares,
  celsiusToFahrenheit,
  cmToInches,
  fahrenheitToCelsius,
  feetToMetres,
  hectaresToAcres,
  HUDSON_1994,
  inchesToCm,
  inUnitSystem,
  kgPerHaToLbPerAcre,
  kgToPounds,
  lbPerAcreToKgPerHa,
  litresToUsGallons,
  M2_PER_ACRE,
  metresToFeet,
  mgPerHaToShortTonsPerAcre,
  MINASNY_MCBRATNEY_2018,
  poundsToKg,
  shortTonsPerAcreToMgPerHa,
  somWaterHoldingEstimate,
  UNITS,
  usGallonsToAcreInches,
  usGallonsToLitres,
  waterDepthMmToCubicMetres,
} from "../../analysis/units";

describe("exact definitions", () => {
  it("inch, foot and pound", () => {
    // NIST SP 811, Appendix B: 1 in = 2.54 cm, 1 ft = 0.3048 m, 1 lb = 0.453 592 37 kg (exact)
    expect(inchesToCm(1)).toBe(2.54);
    expect(feetToMetres(1)).toBe(0.3048);
    expect(poundsToKg(1)).toBe(0.45359237);
  });

  it("acre", () => {
    // NIST Handbook 44, Appendix C: 1 acre = 43 560 ft²; with the international foot = 4046.856 422 4 m²
    expect(M2_PER_ACRE).toBeCloseTo(4046.8564224, 9);
    // common practice: 1 ha = 2.471 acres
    expect(hectaresToAcres(1)).toBeCloseTo(2.471, 3);
  });

  it("US gallon", () => {
    // NIST SP 811, Appendix B: 1 US gal = 3.785 411 784 L (exact)
    expect(usGallonsToLitres(1)).toBeCloseTo(3.785411784, 12);
  });

  it("acre-inch is 27 154 US gal", () => {
    // DESIGN.md "Water": 1 acre-inch = 27 154 US gal; from definitions 43 560 × 144 / 231 = 27 154.29
    expect(acreInchesToUsGallons(1)).toBeCloseTo(27154.29, 2);
  });

  it("1 mm of water over 1 ha is 10 m³", () => {
    // DESIGN.md "Water": 1 mm over 1 ha = 10 m³ (SI arithmetic: 0.001 m × 10 000 m²)
    expect(waterDepthMmToCubicMetres(1, 1)).toBeCloseTo(10, 12);
  });
});

describe("rates per area", () => {
  it("Mg/ha → short tons/acre", () => {
    // From the NIST definitions written out: 1 Mg/ha = 1000 kg × (4046.8564224 / 10 000) / 907.184 74 kg per ton
    const fromDefinitions = (1000 * (4046.8564224 / 10000)) / 907.18474;
    expect(mgPerHaToShortTonsPerAcre(1)).toBeCloseTo(fromDefinitions, 12);
    // common practice: 1 t/ha ≈ 0.446 short ton/acre; 1 short ton/acre ≈ 2.242 Mg/ha
    expect(mgPerHaToShortTonsPerAcre(1)).toBeCloseTo(0.446, 3);
    expect(shortTonsPerAcreToMgPerHa(1)).toBeCloseTo(2.242, 3);
  });

  it("kg/ha → lb/acre", () => {
    // From the NIST definitions written out: 1 kg/ha = (4046.8564224 / 10 000) / 0.45359237 lb/acre
    expect(kgPerHaToLbPerAcre(1)).toBeCloseTo(4046.8564224 / 10000 / 0.45359237, 12);
    // common practice: 1 kg/ha ≈ 0.892 lb/acre; 1 lb/acre ≈ 1.121 kg/ha
    expect(kgPerHaToLbPerAcre(1)).toBeCloseTo(0.892, 3);
    expect(lbPerAcreToKgPerHa(1)).toBeCloseTo(1.121, 3);
  });
});

describe("temperature", () => {
  it("55 °C is 131 °F", () => {
    // 21 CFR 112.54 states the composting temperature as "131 °F (55 °C)"
    expect(celsiusToFahrenheit(55)).toBeCloseTo(131, 12);
  });

  it("fixed points", () => {
    // NIST SP 811, B.9: t/°F = 1.8·t/°C + 32 — water boils at 100 °C = 212 °F, −40 °C = −40 °F
    expect(celsiusToFahrenheit(100)).toBeCloseTo(212, 12);
    expect(fahrenheitToCelsius(-40)).toBeCloseTo(-40, 12);
    // DESIGN.md: active piles 60–71 °C (140–160 °F, common practice)
    expect(celsiusToFahrenheit(60)).toBeCloseTo(140, 12);
    expect(celsiusToFahrenheit(71)).toBeCloseTo(159.8, 12);
  });
});

describe("round trips", () => {
  it("every pair of conversions inverts", () => {
    for (const x of [0, 0.37, 1, 12.5, 1234.5]) {
      expect(inchesToCm(cmToInches(x))).toBeCloseTo(x, 10);
      expect(feetToMetres(metresToFeet(x))).toBeCloseTo(x, 10);
      expect(poundsToKg(kgToPounds(x))).toBeCloseTo(x, 10);
      expect(acresToHectares(hectaresToAcres(x))).toBeCloseTo(x, 10);
      expect(shortTonsPerAcreToMgPerHa(mgPerHaToShortTonsPerAcre(x))).toBeCloseTo(x, 10);
      expect(lbPerAcreToKgPerHa(kgPerHaToLbPerAcre(x))).toBeCloseTo(x, 10);
      expect(fahrenheitToCelsius(celsiusToFahrenheit(x))).toBeCloseTo(x, 10);
      expect(usGallonsToLitres(litresToUsGallons(x))).toBeCloseTo(x, 10);
      expect(usGallonsToAcreInches(acreInchesToUsGallons(x))).toBeCloseTo(x, 10);
    }
  });
});

describe("the units table", () => {
  it("shows a stored SOC stock in either system", () => {
    // 78 Mg C/ha (DESIGN.md check) × 0.446 090 short tons/acre per Mg/ha (NIST definitions above) = 34.795
    expect(inUnitSystem(78, "mg_c_per_ha", "si")).toEqual({ value: 78, unit: "Mg C/ha" });
    const us = inUnitSystem(78, "mg_c_per_ha", "us");
    expect(us.unit).toBe("short tons C/acre");
    expect(us.value).toBeCloseTo(34.795, 3);
  });

  it("converts depths to inches and keeps g/cm³ and % as they are", () => {
    // 30 cm / 2.54 = 11.811 in (NIST SP 811)
    expect(inUnitSystem(30, "cm", "us").value).toBeCloseTo(11.811, 3);
    expect(inUnitSystem(1.3, "g_per_cm3", "us")).toEqual({ value: 1.3, unit: "g/cm³" });
    expect(UNITS.percent.us).toBe("%");
  });
});

describe("somWaterHoldingEstimate", () => {
  it("returns a labelled range with both sources, never a single number", () => {
    const estimate = somWaterHoldingEstimate(1);
    expect(estimate.kind).toBe("estimate");
    expect(estimate.label).toMatch(/Rough estimate/);
    expect(estimate.sources).toEqual([MINASNY_MCBRATNEY_2018, HUDSON_1994]);
    expect(estimate.sources[0]).toMatch(/Minasny & McBratney 2018/);
    expect(estimate.sources[1]).toMatch(/Hudson 1994/);
    expect(estimate.low).toBeLessThan(estimate.high);
  });

  it("matches a hand calculation for +1 SOM point over 0–30 cm", () => {
    // high: 20 000 US gal/acre per SOM point (rule of thumb traced to Hudson 1994, DESIGN.md)
    // low: Minasny & McBratney 2018, 15 mm per m per 1 % OC; 1 % SOM = 1/1.724 = 0.58005 % OC (van Bemmelen)
    //      water = 15 × 0.58005 × 0.30 m = 2.6102 mm; × 4046.856 m² = 10.5633 m³ = 10 563.3 L
    //      / 3.785 411 784 L/gal = 2790.5 US gal/acre
    const estimate = somWaterHoldingEstimate(1, 30);
    expect(estimate.high).toBe(20000);
    expect(estimate.low).toBeCloseTo(2790.5, 0);
    expect(estimate.unit).toBe("US gal/acre");
  });

  it("scales with the SOM increase and refuses nonsense", () => {
    expect(somWaterHoldingEstimate(2).high).toBe(40000);
    expect(() => somWaterHoldingEstimate(-1)).toThrow(/zero or more/);
    expect(() => somWaterHoldingEstimate(1, 0)).toThrow(/more than 0 cm/);
  });
});

describe("water per area", () => {
  it("converts US gallons per acre to cubic metres per hectare", async () => {
    const { usGallonsPerAcreToCubicMetresPerHa } = await import("../../analysis/units");
    // 1 US gal = 3.785411784 L and 1 acre = 4046.8564224 m² (NIST Handbook 44, exact):
    // 1 US gal/acre = 3.785411784e-3 m³ × 10 000 / 4046.8564224 = 0.0093540 m³/ha.
    expect(usGallonsPerAcreToCubicMetresPerHa(1)).toBeCloseTo(0.009354, 6);
  });
});
