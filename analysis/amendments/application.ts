import { MeasurementError, requireFinite, requireNonNegative, requirePositive } from "../soil/errors";

/** Throws unless a wet-basis moisture % is in [0, 100). */
function requireWetBasisMoisture(moisturePercentWetBasis: number): void {
  requireFinite(moisturePercentWetBasis, "Moisture (% wet basis)", "moisturePercentWetBasis");
  if (moisturePercentWetBasis < 0 || moisturePercentWetBasis >= 100) {
    throw new MeasurementError(
      `Moisture on a wet basis must be at least 0 % and below 100 % (got ${moisturePercentWetBasis} %).`,
      "moisturePercentWetBasis",
    );
  }
}

/**
 * As-is (field-moist) amendment mass for one plot, kg:
 * kg = R (Mg DM/ha) × 1000 × area (m²) / 10 000 / (1 − moisture_wet/100).
 * Wet-basis moisture = water / as-is mass, as lab reports give it.
 * Source: DESIGN.md "Amendments" (10 Mg/ha on 18 m² at 38 % moisture = 29.03 kg); mass balance.
 */
export function asIsKgPerPlot(
  dryMatterRateMgPerHa: number,
  plotAreaM2: number,
  moisturePercentWetBasis: number,
): number {
  requireNonNegative(dryMatterRateMgPerHa, "Dry-matter rate (Mg/ha)", "dryMatterRateMgPerHa");
  requirePositive(plotAreaM2, "Plot area (m²)", "plotAreaM2");
  requireWetBasisMoisture(moisturePercentWetBasis);
  const dryKg = (dryMatterRateMgPerHa * 1000 * plotAreaM2) / 10_000;
  return dryKg / (1 - moisturePercentWetBasis / 100);
}

/**
 * Dry mass from an as-is mass and its wet-basis moisture, kg: m_dry = m_as-is × (1 − moisture_wet/100).
 * Source: definition of wet-basis moisture.
 */
export function dryMassKgFromAsIs(asIsKg: number, moisturePercentWetBasis: number): number {
  requireNonNegative(asIsKg, "As-is mass (kg)", "asIsKg");
  requireWetBasisMoisture(moisturePercentWetBasis);
  return asIsKg * (1 - moisturePercentWetBasis / 100);
}

/**
 * Carbon or nitrogen applied, kg/ha, from a dry-matter rate and a dry-basis concentration:
 * kg/ha = R (Mg DM/ha) × 1000 × percent_dry / 100.
 * Source: mass balance on a dry basis (DESIGN.md "Amendments").
 */
export function elementAppliedKgPerHa(dryMatterRateMgPerHa: number, percentDryBasis: number): number {
  requireNonNegative(dryMatterRateMgPerHa, "Dry-matter rate (Mg/ha)", "dryMatterRateMgPerHa");
  requireNonNegative(percentDryBasis, "Concentration (% dry basis)", "percentDryBasis");
  if (percentDryBasis > 100) {
    throw new MeasurementError(`A concentration cannot exceed 100 % (got ${percentDryBasis} %).`, "percentDryBasis");
  }
  return dryMatterRateMgPerHa * 1000 * (percentDryBasis / 100);
}
