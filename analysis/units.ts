/**
 * The one units module. Tilthmark computes and stores SI (Mg/ha, kg/ha, g/cm³, cm, °C);
 * a user preference shows US customary units on sheets and briefs. Every conversion goes
 * through here.
 *
 * Exact constants are the definitions of the international inch, foot and avoirdupois pound
 * (1959 international yard and pound agreement) and the US liquid gallon (231 in³), as listed in
 * NIST Special Publication 811 (2008), Appendix B, and NIST Handbook 44, Appendix C. The acre is
 * 43 560 international square feet; NIST retired the US survey foot on 2023-01-01
 * (Federal Register 85 FR 62698), which changes the acre by 4 parts per million.
 */

import { VAN_BEMMELEN_FACTOR } from "./soil/organic-matter";

/** 1 inch = 2.54 cm exactly (NIST SP 811, Appendix B). */
export const CM_PER_INCH = 2.54;
/** 1 foot = 12 in = 0.3048 m exactly (NIST SP 811, Appendix B). */
export const M_PER_FOOT = 0.3048;
/** 1 pound (avoirdupois) = 0.453 592 37 kg exactly (NIST SP 811, Appendix B). */
export const KG_PER_POUND = 0.45359237;
/** 1 short ton = 2000 lb = 907.184 74 kg exactly (NIST Handbook 44, Appendix C). */
export const KG_PER_SHORT_TON = 2000 * KG_PER_POUND;
/** 1 hectare = 10 000 m² exactly (SI). */
export const M2_PER_HECTARE = 10_000;
/** 1 acre = 43 560 ft² = 4046.856 422 4 m² exactly (international foot; NIST Handbook 44, Appendix C). */
export const M2_PER_ACRE = 43_560 * M_PER_FOOT * M_PER_FOOT;
/** 1 US liquid gallon = 231 in³ = 3.785 411 784 L exactly (NIST SP 811, Appendix B). */
export const LITRES_PER_US_GALLON = (231 * CM_PER_INCH ** 3) / 1000;
/** 1 acre-inch = 43 560 ft² × 1 in = 6 272 640 in³ = 27 154.29 US gal (from the definitions above). */
export const US_GALLONS_PER_ACRE_INCH = (43_560 * 144) / 231;

// ----- length -----

/** inches = cm / 2.54 (NIST SP 811). */
export function cmToInches(cm: number): number {
  return cm / CM_PER_INCH;
}

/** cm = inches × 2.54 (NIST SP 811). */
export function inchesToCm(inches: number): number {
  return inches * CM_PER_INCH;
}

/** feet = m / 0.3048 (NIST SP 811). */
export function metresToFeet(m: number): number {
  return m / M_PER_FOOT;
}

/** m = feet × 0.3048 (NIST SP 811). */
export function feetToMetres(feet: number): number {
  return feet * M_PER_FOOT;
}

// ----- area, mass -----

/** acres = ha × 10 000 / 4046.856 422 4 (NIST Handbook 44). */
export function hectaresToAcres(ha: number): number {
  return (ha * M2_PER_HECTARE) / M2_PER_ACRE;
}

/** ha = acres × 4046.856 422 4 / 10 000 (NIST Handbook 44). */
export function acresToHectares(acres: number): number {
  return (acres * M2_PER_ACRE) / M2_PER_HECTARE;
}

/** ft² = m² / 0.3048² (NIST SP 811). */
export function squareMetresToSquareFeet(m2: number): number {
  return m2 / (M_PER_FOOT * M_PER_FOOT);
}

/** lb = kg / 0.453 592 37 (NIST SP 811). */
export function kgToPounds(kg: number): number {
  return kg / KG_PER_POUND;
}

/** kg = lb × 0.453 592 37 (NIST SP 811). */
export function poundsToKg(lb: number): number {
  return lb * KG_PER_POUND;
}

// ----- rates per area -----

/** short tons/acre = Mg/ha × 1000 kg/Mg × (m²/acre ÷ m²/ha) / 907.184 74 kg/ton (≈ 0.446). */
export function mgPerHaToShortTonsPerAcre(mgPerHa: number): number {
  return (mgPerHa * 1000 * (M2_PER_ACRE / M2_PER_HECTARE)) / KG_PER_SHORT_TON;
}

/** Mg/ha = short tons/acre × 907.184 74 kg/ton × (m²/ha ÷ m²/acre) / 1000 (≈ 2.242). */
export function shortTonsPerAcreToMgPerHa(tonsPerAcre: number): number {
  return (tonsPerAcre * KG_PER_SHORT_TON * (M2_PER_HECTARE / M2_PER_ACRE)) / 1000;
}

/** lb/acre = kg/ha × (m²/acre ÷ m²/ha) / 0.453 592 37 kg/lb (≈ 0.892). */
export function kgPerHaToLbPerAcre(kgPerHa: number): number {
  return (kgPerHa * (M2_PER_ACRE / M2_PER_HECTARE)) / KG_PER_POUND;
}

/** kg/ha = lb/acre × 0.453 592 37 kg/lb × (m²/ha ÷ m²/acre) (≈ 1.121). */
export function lbPerAcreToKgPerHa(lbPerAcre: number): number {
  return lbPerAcre * KG_PER_POUND * (M2_PER_HECTARE / M2_PER_ACRE);
}

// ----- temperature -----

/** °F = °C × 9/5 + 32 (NIST SP 811, Appendix B.9). */
export function celsiusToFahrenheit(celsius: number): number {
  return (celsius * 9) / 5 + 32;
}

/** °C = (°F − 32) × 5/9 (NIST SP 811, Appendix B.9). */
export function fahrenheitToCelsius(fahrenheit: number): number {
  return ((fahrenheit - 32) * 5) / 9;
}

// ----- water -----

/** US gal = L / 3.785 411 784 (NIST SP 811). */
/** US gallons per acre → cubic metres per hectare (exact definitions above). */
export function usGallonsPerAcreToCubicMetresPerHa(gallonsPerAcre: number): number {
  return ((gallonsPerAcre * LITRES_PER_US_GALLON) / 1000) * (10_000 / M2_PER_ACRE);
}

export function litresToUsGallons(litres: number): number {
  return litres / LITRES_PER_US_GALLON;
}

/** L = US gal × 3.785 411 784 (NIST SP 811). */
export function usGallonsToLitres(gallons: number): number {
  return gallons * LITRES_PER_US_GALLON;
}

/** US gal = acre-inches × 27 154.29 (1 acre-inch = 43 560 ft² × 1 in ÷ 231 in³/gal). */
export function acreInchesToUsGallons(acreInches: number): number {
  return acreInches * US_GALLONS_PER_ACRE_INCH;
}

/** acre-inches = US gal / 27 154.29. */
export function usGallonsToAcreInches(gallons: number): number {
  return gallons / US_GALLONS_PER_ACRE_INCH;
}

/** m³ = depth mm × area ha × 10 (1 mm over 10 000 m² = 10 m³; SI). */
export function waterDepthMmToCubicMetres(depthMm: number, areaHa: number): number {
  return (depthMm / 1000) * areaHa * M2_PER_HECTARE;
}

/** A value labelled as an estimate: a range, never a single number, with the sources behind each end. */
export interface RoughEstimate {
  kind: "estimate";
  low: number;
  high: number;
  unit: string;
  /** What the range means, in a sentence fit for a brief. */
  label: string;
  /** One citation per end of the range, low first. */
  sources: [low: string, high: string];
}

export const HUDSON_1994 =
  "Hudson 1994, J. Soil Water Conserv. 49:189–194 — the source of the rule of thumb " +
  "'each percentage point of SOM holds up to about 20 000 US gal more water per acre'";
export const MINASNY_MCBRATNEY_2018 =
  "Minasny & McBratney 2018, Eur. J. Soil Sci. 69:39–47 — a 1 % mass increase in organic carbon " +
  "raised available water capacity by about 15–20 mm per m of soil on average";

/** Upper end of the rule of thumb: US gal per acre per SOM percentage point (Hudson 1994, as popularly quoted). */
const RULE_OF_THUMB_US_GAL_PER_ACRE_PER_SOM_POINT = 20_000;
/** Minasny & McBratney 2018: available-water gain per 1 % organic carbon, low end of their average, mm per m of soil. */
const MINASNY_MM_PER_M_PER_OC_POINT = 15;

/**
 * Extra water a soil might hold after SOM rises, as a rough range in US gal per acre.
 *
 * low  = 15 mm/m per 1 % OC (Minasny & McBratney 2018) × (ΔSOM / 1.724) × depth (m), converted
 *        from mm over one acre to US gal; SOM → OC by the van Bemmelen factor 1.724.
 * high = 20 000 US gal/acre × ΔSOM (rule of thumb traced to Hudson 1994; depth unspecified).
 *
 * The two sources disagree by roughly an order of magnitude, which is the point of showing both.
 */
export function somWaterHoldingEstimate(somIncreasePoints: number, depthCm = 30): RoughEstimate {
  if (!Number.isFinite(somIncreasePoints) || somIncreasePoints < 0) {
    throw new Error("The SOM increase must be zero or more percentage points.");
  }
  if (!Number.isFinite(depthCm) || depthCm <= 0) {
    throw new Error("The soil depth for the water estimate must be more than 0 cm.");
  }
  const ocPoints = somIncreasePoints / VAN_BEMMELEN_FACTOR;
  const waterMm = MINASNY_MM_PER_M_PER_OC_POINT * ocPoints * (depthCm / 100);
  const litresPerAcre = (waterMm / 1000) * M2_PER_ACRE * 1000;
  return {
    kind: "estimate",
    low: litresToUsGallons(litresPerAcre),
    high: RULE_OF_THUMB_US_GAL_PER_ACRE_PER_SOM_POINT * somIncreasePoints,
    unit: "US gal/acre",
    label:
      `Rough estimate: +${somIncreasePoints} percentage points of SOM might let the top ${depthCm} cm of soil ` +
      "hold somewhere between these amounts of extra water per acre; effects are larger in sandy soils " +
      "and small in clays. Not a measurement.",
    sources: [MINASNY_MCBRATNEY_2018, HUDSON_1994],
  };
}

// ----- the units table: display in SI or US customary -----

export type UnitSystem = "si" | "us";

/** Units Tilthmark stores values in; each knows its US customary display form (or has none). */
export type SiUnit =
  | "percent"
  | "g_per_cm3"
  | "mg_per_ha"
  | "mg_c_per_ha"
  | "kg_per_ha"
  | "kg"
  | "cm"
  | "m"
  | "m2"
  | "degC"
  | "cm3"
  | "m3"
  | "count_per_m2"
  | "none";

interface UnitEntry {
  si: string;
  us: string;
  toUs: (value: number) => number;
}

const same = (value: number) => value;

/**
 * The units table: SI label, US customary label and the conversion. Soil scientists in the US
 * report bulk density in g/cm³ and percentages as percentages, so those stay as they are.
 */
export const UNITS: Record<SiUnit, UnitEntry> = {
  percent: { si: "%", us: "%", toUs: same },
  g_per_cm3: { si: "g/cm³", us: "g/cm³", toUs: same },
  mg_per_ha: { si: "Mg/ha", us: "short tons/acre", toUs: mgPerHaToShortTonsPerAcre },
  mg_c_per_ha: { si: "Mg C/ha", us: "short tons C/acre", toUs: mgPerHaToShortTonsPerAcre },
  kg_per_ha: { si: "kg/ha", us: "lb/acre", toUs: kgPerHaToLbPerAcre },
  kg: { si: "kg", us: "lb", toUs: kgToPounds },
  cm: { si: "cm", us: "in", toUs: cmToInches },
  m: { si: "m", us: "ft", toUs: metresToFeet },
  m2: { si: "m²", us: "ft²", toUs: squareMetresToSquareFeet },
  degC: { si: "°C", us: "°F", toUs: celsiusToFahrenheit },
  cm3: { si: "cm³", us: "in³", toUs: (cm3) => cm3 / CM_PER_INCH ** 3 },
  m3: { si: "m³", us: "ft³", toUs: (m3) => m3 / M_PER_FOOT ** 3 },
  count_per_m2: { si: "per m²", us: "per ft²", toUs: (perM2) => perM2 * M_PER_FOOT * M_PER_FOOT },
  none: { si: "", us: "", toUs: same },
};

/** A stored SI value expressed in the user's unit system, with the label to print beside it. */
export function inUnitSystem(value: number, unit: SiUnit, system: UnitSystem): { value: number; unit: string } {
  const entry = UNITS[unit];
  return system === "si" ? { value, unit: entry.si } : { value: entry.toUs(value), unit: entry.us };
}
