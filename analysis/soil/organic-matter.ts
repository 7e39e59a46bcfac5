import { MeasurementError, requireFinite, requirePositive } from "./errors";

/** A lab's own LOI → SOM calibration, SOM % = slope · LOI % + intercept. */
export interface SomCalibration {
  slope: number;
  intercept: number;
}

/**
 * SOM % from LOI %: the identity (SOM = LOI) or a lab calibration SOM = a·LOI + b.
 * Source: calibrations of this linear form are standard for LOI (e.g. Heiri, Lotter & Lemcke 2001);
 * the coefficients belong to the lab method a trial chooses.
 * A calibrated SOM below 0 is rejected rather than clipped to 0, which would hide the error.
 */
export function somPercentFromLoi(loiPercent: number, calibration?: SomCalibration): number {
  requireFinite(loiPercent, "LOI (%)", "loiPercent");
  if (!calibration) return loiPercent;
  requireFinite(calibration.slope, "Calibration slope", "slope");
  requireFinite(calibration.intercept, "Calibration intercept", "intercept");
  const som = calibration.slope * loiPercent + calibration.intercept;
  if (som < 0) {
    throw new MeasurementError(
      `The lab calibration gives a negative SOM (${som.toFixed(2)} %) for LOI ${loiPercent} %; ` +
        "the calibration does not cover this value.",
      "loiPercent",
    );
  }
  return som;
}

/** van Bemmelen factor: SOM is taken as 58 % carbon (Nelson & Sommers 1996, Methods of Soil Analysis Part 3). */
export const VAN_BEMMELEN_FACTOR = 1.724;
/** Pribyl 2010 (Geoderma 156:75–83): SOM is about 50 % carbon, factor 2.0. */
export const PRIBYL_FACTOR = 2.0;

export type SomToSocFactor = typeof VAN_BEMMELEN_FACTOR | typeof PRIBYL_FACTOR;

/**
 * SOC % = SOM % / f, f = 1.724 (van Bemmelen; Nelson & Sommers 1996) by default or
 * 2.0 (Pribyl 2010, Geoderma 156:75–83).
 */
export function socPercentFromSom(somPercent: number, factor: SomToSocFactor = VAN_BEMMELEN_FACTOR): number {
  requireFinite(somPercent, "SOM (%)", "somPercent");
  requirePositive(factor, "SOM-to-SOC factor", "factor");
  return somPercent / factor;
}
