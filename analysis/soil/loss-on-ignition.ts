import { MeasurementError, requireFinite, type PlausibilityFlag } from "./errors";

/** One crucible weighed three times, as a lab records it (all masses in grams). */
export interface LoiWeighings {
  crucibleG: number;
  /** Crucible + oven-dry soil (105 °C). */
  crucibleDrySoilG: number;
  /** Crucible + residue after ignition. */
  crucibleResidueG: number;
}

/**
 * Loss on ignition, % of oven-dry mass.
 *
 * dry = (crucible + oven-dry soil) − crucible; ash = (crucible + residue) − crucible;
 * LOI % = (dry − ash) / dry × 100.
 * Source: Heiri, Lotter & Lemcke 2001, J. Paleolimnology 25:101–110; ASTM D2974.
 * Rejects dry ≤ 0 and ash > dry (a residue heavier than the soil means a weighing or entry error).
 */
export function lossOnIgnitionPercent({ crucibleG, crucibleDrySoilG, crucibleResidueG }: LoiWeighings): number {
  requireFinite(crucibleG, "Crucible mass (g)", "crucibleG");
  requireFinite(crucibleDrySoilG, "Crucible + oven-dry soil mass (g)", "crucibleDrySoilG");
  requireFinite(crucibleResidueG, "Crucible + ignited residue mass (g)", "crucibleResidueG");
  if (crucibleG < 0) throw new MeasurementError(`Crucible mass cannot be negative (got ${crucibleG} g).`, "crucibleG");
  const dryG = crucibleDrySoilG - crucibleG;
  const ashG = crucibleResidueG - crucibleG;
  if (dryG <= 0) {
    throw new MeasurementError(
      `Oven-dry soil mass is ${round(dryG)} g: crucible + oven-dry soil (${crucibleDrySoilG} g) must be heavier ` +
        `than the empty crucible (${crucibleG} g). Check the two weighings.`,
      "crucibleDrySoilG",
    );
  }
  if (ashG < 0) {
    throw new MeasurementError(
      `Crucible + ignited residue (${crucibleResidueG} g) is lighter than the empty crucible (${crucibleG} g). ` +
        "Check the weighings.",
      "crucibleResidueG",
    );
  }
  if (ashG > dryG) {
    throw new MeasurementError(
      `The ignited residue (${round(ashG)} g) is heavier than the oven-dry soil (${round(dryG)} g); ` +
        "ignition cannot add mass. Check that the weighings are in the right columns.",
      "crucibleResidueG",
    );
  }
  return ((dryG - ashG) / dryG) * 100;
}

/** LOI above this in a mineral soil earns a warning (threshold from issue 4, lab intake). */
export const MINERAL_SOIL_LOI_WARNING_PERCENT = 40;

/**
 * Plausibility of an LOI value for a mineral soil: warning above 40 % (organic soils and peats can
 * legitimately exceed it, so it is never an error), otherwise ok. Threshold: issue 4 (lab intake).
 */
export function lossOnIgnitionFlag(loiPercent: number): PlausibilityFlag {
  if (loiPercent > MINERAL_SOIL_LOI_WARNING_PERCENT) {
    return {
      status: "warning",
      message:
        `LOI ${loiPercent.toFixed(2)} % is above ${MINERAL_SOIL_LOI_WARNING_PERCENT} %, unusual for a mineral soil. ` +
        "Confirm it if the sample is organic material or peat.",
    };
  }
  return { status: "ok" };
}

function round(x: number): number {
  return Math.round(x * 10_000) / 10_000;
}
