// Derived values of one measurement, from its raw inputs, through the analysis library. Pure.
// Used by validation (to show what will be stored and flag it) and by the derived-values loader.
import {
  MeasurementError,
  bulkDensityFlag,
  coreVolumeCm3,
  fineEarthBulkDensity,
  gravimetricMoisturePercentDryBasis,
  lossOnIgnitionFlag,
  lossOnIgnitionPercent,
  socPercentFromSom,
  somPercentFromLoi,
  wholeCoreBulkDensity,
  type PlausibilityFlag,
  type SomCalibration,
  type SomToSocFactor,
} from "../../../analysis/soil";

export type Inputs = Record<string, number | string | null>;

/** How a trial turns LOI into SOM and SOC: its lab method's calibration and its SOM-to-SOC factor. */
export interface CarbonMethod {
  calibration?: SomCalibration;
  socFactor: number;
}

export interface LoiValues {
  loi: number;
  som: number;
  soc: number;
}

export interface BdValues {
  volumeCm3: number;
  bd: number;
  bd_fine: number;
  moisture: number | null;
}

export type Derivation<T> = { ok: true; values: T; flags: PlausibilityFlag[] } | { ok: false; error: MeasurementError };

const num = (inputs: Inputs, key: string) => (typeof inputs[key] === "number" ? (inputs[key] as number) : undefined);

function attempt<T>(run: () => { values: T; flags: PlausibilityFlag[] }): Derivation<T> {
  try {
    return { ok: true, ...run() };
  } catch (error) {
    if (error instanceof MeasurementError) return { ok: false, error };
    throw error;
  }
}

/** LOI % (Heiri et al. 2001), SOM % (identity or the lab calibration), SOC % = SOM / factor. */
export function deriveLoi(inputs: Inputs, method: CarbonMethod): Derivation<LoiValues> {
  return attempt(() => {
    const loi = lossOnIgnitionPercent({
      crucibleG: num(inputs, "crucibleG") ?? Number.NaN,
      crucibleDrySoilG: num(inputs, "crucibleDrySoilG") ?? Number.NaN,
      crucibleResidueG: num(inputs, "crucibleResidueG") ?? Number.NaN,
    });
    const som = somPercentFromLoi(loi, method.calibration);
    const soc = socPercentFromSom(som, method.socFactor as SomToSocFactor);
    return { values: { loi, som, soc }, flags: [lossOnIgnitionFlag(loi)] };
  });
}

/**
 * Core volume, whole-core BD, fine-earth BD (coarse fragments blank = none found) and dry-basis
 * moisture when a field-moist mass is given (Blake & Hartge 1986; Poeplau et al. 2017).
 */
export function deriveBd(inputs: Inputs): Derivation<BdValues> {
  return attempt(() => {
    const volumeCm3 = coreVolumeCm3({ diameterCm: num(inputs, "diameterCm"), heightCm: num(inputs, "heightCm"), volumeCm3: num(inputs, "volumeCm3") });
    const dry = num(inputs, "ovenDryMassG") ?? Number.NaN;
    const bd = wholeCoreBulkDensity(dry, volumeCm3);
    const bdFine = fineEarthBulkDensity(dry, num(inputs, "coarseFragmentMassG") ?? 0, volumeCm3);
    const wet = num(inputs, "wetMassG");
    const moisture = wet === undefined ? null : gravimetricMoisturePercentDryBasis(wet, dry);
    return { values: { volumeCm3, bd, bd_fine: bdFine, moisture }, flags: [bulkDensityFlag(bd)] };
  });
}

/** A custom variable's value, checked against the range the program registered for it. */
export function deriveCustom(inputs: Inputs, range: { minValue: number | null; maxValue: number | null; label: string; unit: string }): Derivation<{ value: number }> {
  return attempt(() => {
    const value = num(inputs, "value");
    if (value === undefined) throw new MeasurementError(`${range.label} needs a number.`, "value");
    if ((range.minValue !== null && value < range.minValue) || (range.maxValue !== null && value > range.maxValue)) {
      throw new MeasurementError(
        `${range.label} ${value} ${range.unit} is outside the range registered for this variable (${range.minValue ?? "−∞"} to ${range.maxValue ?? "∞"} ${range.unit}). Check the value or its unit.`,
        "value",
      );
    }
    return { values: { value }, flags: [] };
  });
}
