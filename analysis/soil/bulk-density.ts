import { MeasurementError, requireNonNegative, requirePositive, type PlausibilityFlag } from "./errors";

/** A core's volume: either its ring dimensions or a volume the lab measured. Both may be given; then they must agree. */
export interface CoreDimensions {
  diameterCm?: number;
  heightCm?: number;
  volumeCm3?: number;
}

/** Ring dimensions and a stated volume further apart than this (relative) are refused as contradictory. */
const VOLUME_AGREEMENT = 0.01;

/**
 * Core volume, cm³: V = π (d/2)² h, or the stated volume.
 * Source: core method, Blake & Hartge 1986 (Methods of Soil Analysis Part 1);
 * Grossman & Reinsch 2002 (Part 4).
 */
export function coreVolumeCm3({ diameterCm, heightCm, volumeCm3 }: CoreDimensions): number {
  const hasDimensions = diameterCm !== undefined || heightCm !== undefined;
  if (hasDimensions) {
    if (diameterCm === undefined || heightCm === undefined) {
      throw new MeasurementError(
        "Give both the core diameter and the core height (cm), or the core volume (cm³) alone.",
        diameterCm === undefined ? "diameterCm" : "heightCm",
      );
    }
    requirePositive(diameterCm, "Core diameter (cm)", "diameterCm");
    requirePositive(heightCm, "Core height (cm)", "heightCm");
  }
  const fromDimensions = hasDimensions ? Math.PI * (diameterCm! / 2) ** 2 * heightCm! : undefined;
  if (volumeCm3 === undefined) {
    if (fromDimensions === undefined) {
      throw new MeasurementError("The core needs a volume (cm³) or a diameter and height (cm).", "volumeCm3");
    }
    return fromDimensions;
  }
  requirePositive(volumeCm3, "Core volume (cm³)", "volumeCm3");
  if (fromDimensions !== undefined && Math.abs(fromDimensions - volumeCm3) > VOLUME_AGREEMENT * volumeCm3) {
    throw new MeasurementError(
      `The core diameter and height give ${fromDimensions.toFixed(1)} cm³ but the volume column says ${volumeCm3} cm³. ` +
        "Keep the one that is right and clear the other.",
      "volumeCm3",
    );
  }
  return volumeCm3;
}

/**
 * Whole-core bulk density, g/cm³: BD = m_dry / V.
 * Source: Blake & Hartge 1986; Grossman & Reinsch 2002.
 */
export function wholeCoreBulkDensity(ovenDryMassG: number, volumeCm3: number): number {
  requirePositive(ovenDryMassG, "Oven-dry core mass (g)", "ovenDryMassG");
  requirePositive(volumeCm3, "Core volume (cm³)", "volumeCm3");
  return ovenDryMassG / volumeCm3;
}

/**
 * Fine-earth bulk density, g/cm³: BD_fine = (m_dry − m_cf) / V, where m_cf is the oven-dry mass of
 * coarse fragments (> 2 mm). Fine-earth mass per total soil volume is the quantity SOC stocks use.
 * Source: Poeplau, Vos & Don 2017, SOIL 3:61–66.
 */
export function fineEarthBulkDensity(ovenDryMassG: number, coarseFragmentMassG: number, volumeCm3: number): number {
  requirePositive(ovenDryMassG, "Oven-dry core mass (g)", "ovenDryMassG");
  requireNonNegative(coarseFragmentMassG, "Coarse-fragment mass (g)", "coarseFragmentMassG");
  requirePositive(volumeCm3, "Core volume (cm³)", "volumeCm3");
  if (coarseFragmentMassG > ovenDryMassG) {
    throw new MeasurementError(
      `The coarse fragments (${coarseFragmentMassG} g) weigh more than the whole oven-dry core (${ovenDryMassG} g). ` +
        "Check the two masses.",
      "coarseFragmentMassG",
    );
  }
  return (ovenDryMassG - coarseFragmentMassG) / volumeCm3;
}

/** Plausible mineral-soil bulk density, g/cm³ (common practice); outside it a value earns a warning. */
export const BULK_DENSITY_PLAUSIBLE_RANGE = { low: 0.5, high: 2.0 } as const;
/** Particle density of quartz, g/cm³ (common practice): a bulk density at or above it is impossible. */
export const QUARTZ_PARTICLE_DENSITY = 2.65;

/**
 * Plausibility of a bulk density: error at ≥ 2.65 g/cm³ (the particle density of quartz, so the
 * core cannot be that dense) or ≤ 0; warning outside 0.5–2.0 g/cm³; otherwise ok.
 * Thresholds: DESIGN.md, from common practice.
 */
export function bulkDensityFlag(bdGPerCm3: number): PlausibilityFlag {
  const { low, high } = BULK_DENSITY_PLAUSIBLE_RANGE;
  if (!Number.isFinite(bdGPerCm3) || bdGPerCm3 <= 0) {
    return { status: "error", message: `Bulk density must be a positive number (got ${bdGPerCm3}).` };
  }
  const shown = bdGPerCm3.toFixed(2);
  if (bdGPerCm3 >= QUARTZ_PARTICLE_DENSITY) {
    return {
      status: "error",
      message:
        `Bulk density ${shown} g/cm³ is at or above the density of quartz (${QUARTZ_PARTICLE_DENSITY} g/cm³), ` +
        "which a soil core cannot reach. Check the core mass and volume.",
    };
  }
  if (bdGPerCm3 < low || bdGPerCm3 > high) {
    return {
      status: "warning",
      message: `Bulk density ${shown} g/cm³ is outside the usual ${low}–${high} g/cm³ for mineral soil. Confirm it if it is right.`,
    };
  }
  return { status: "ok" };
}
