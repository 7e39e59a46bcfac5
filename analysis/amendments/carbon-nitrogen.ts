import { MeasurementError, requireNonNegative, requirePositive } from "../soil/errors";

/**
 * C:N ratio (mass basis) = total C % / total N %, both on a dry basis.
 * Source: definition; composting feedstock target about 25–30:1 (common practice).
 */
export function cnRatio(carbonPercentDry: number, nitrogenPercentDry: number): number {
  requireNonNegative(carbonPercentDry, "Total C (% dry basis)", "carbonPercentDry");
  requirePositive(nitrogenPercentDry, "Total N (% dry basis)", "nitrogenPercentDry");
  return carbonPercentDry / nitrogenPercentDry;
}

/** One batch in a blend: its dry mass (any mass unit, the same for all batches) and dry-basis C and N. */
export interface BlendComponent {
  dryMass: number;
  carbonPercentDry: number;
  nitrogenPercentDry: number;
}

/**
 * C:N of a blend of batches, weighted by dry mass: C:N = Σ mᵢ·Cᵢ / Σ mᵢ·Nᵢ.
 * (Averaging the batches' ratios would be wrong: ratios do not mix linearly.)
 * Source: DESIGN.md "Amendments"; mass balance of C and N.
 */
export function blendCnRatio(components: readonly BlendComponent[]): number {
  if (components.length === 0) throw new MeasurementError("A blend needs at least one batch.");
  let carbon = 0;
  let nitrogen = 0;
  components.forEach((c, i) => {
    const which = `Batch ${i + 1}`;
    requireNonNegative(c.dryMass, `${which}: dry mass`, "dryMass");
    requireNonNegative(c.carbonPercentDry, `${which}: total C (% dry basis)`, "carbonPercentDry");
    requireNonNegative(c.nitrogenPercentDry, `${which}: total N (% dry basis)`, "nitrogenPercentDry");
    carbon += c.dryMass * c.carbonPercentDry;
    nitrogen += c.dryMass * c.nitrogenPercentDry;
  });
  if (nitrogen <= 0) {
    throw new MeasurementError("The blend contains no nitrogen (or no mass), so its C:N ratio is undefined.");
  }
  return carbon / nitrogen;
}
