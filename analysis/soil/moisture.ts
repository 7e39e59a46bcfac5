import { MeasurementError, requireFinite, requirePositive } from "./errors";

/**
 * Gravimetric soil moisture, dry basis, %: θ_g = (m_wet − m_dry) / m_dry × 100.
 * Source: Gardner 1986, Methods of Soil Analysis Part 1 (oven-drying at 105 °C) — from memory;
 * basis as in DESIGN.md ("soil gravimetric moisture is dry-basis").
 */
export function gravimetricMoisturePercentDryBasis(wetMassG: number, ovenDryMassG: number): number {
  requireFinite(wetMassG, "Wet (field-moist) mass (g)", "wetMassG");
  requirePositive(ovenDryMassG, "Oven-dry mass (g)", "ovenDryMassG");
  if (wetMassG < ovenDryMassG) {
    throw new MeasurementError(
      `The wet mass (${wetMassG} g) is less than the oven-dry mass (${ovenDryMassG} g); drying cannot add mass. ` +
        "Check the two masses.",
      "wetMassG",
    );
  }
  return ((wetMassG - ovenDryMassG) / ovenDryMassG) * 100;
}
