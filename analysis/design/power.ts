import jStat from "jstat";

/** Residual degrees of freedom of an RCBD: df = (t − 1)(r − 1). Source: any ANOVA table for an RCBD. */
export function rcbdErrorDf(treatments: number, blocks: number): number {
  if (!Number.isInteger(treatments) || treatments < 2)
    throw new Error(`An RCBD needs at least 2 treatments (got ${treatments}).`);
  if (!Number.isInteger(blocks) || blocks < 2) throw new Error(`Planning needs at least 2 blocks (got ${blocks}).`);
  return (treatments - 1) * (blocks - 1);
}

/**
 * Residual mean square implied by an expected coefficient of variation: MSE = (CV/100 · mean)².
 * Source: CV % = √MSE / mean × 100 (DESIGN.md "Statistics"), solved for MSE.
 */
export function mseFromCv(cvPercent: number, mean: number): number {
  if (!Number.isFinite(cvPercent) || cvPercent <= 0)
    throw new Error(`The CV must be more than 0 % (got ${cvPercent}).`);
  if (!Number.isFinite(mean) || mean <= 0) throw new Error(`The expected mean must be more than 0 (got ${mean}).`);
  return ((cvPercent / 100) * mean) ** 2;
}

export interface PlanningAssumptions {
  treatments: number;
  /** Expected residual mean square (from a pilot, or mseFromCv). */
  mse: number;
  /** Two-sided significance level; default 0.05. */
  alpha?: number;
  /** Probability of detecting the difference; default 0.80. */
  power?: number;
}

function checkAssumptions({ mse, alpha = 0.05, power = 0.8 }: PlanningAssumptions): { alpha: number; power: number } {
  if (!Number.isFinite(mse) || mse <= 0) throw new Error(`The expected MSE must be more than 0 (got ${mse}).`);
  if (!(alpha > 0 && alpha < 1)) throw new Error(`α must lie between 0 and 1 (got ${alpha}).`);
  if (!(power > 0 && power < 1)) throw new Error(`Power must lie between 0 and 1 (got ${power}).`);
  return { alpha, power };
}

/**
 * Minimum detectable difference between two treatment means in an RCBD with r blocks:
 * MDD = (t_{1−α/2, df} + t_{1−β, df}) · √(2·MSE / r), df = (t − 1)(r − 1), 1 − β = power.
 * Source: DESIGN.md "Planning"; this is the usual central-t approximation (Cochran & Cox 1957,
 * Experimental Designs, ch. 2 — from memory). t quantiles from jstat.
 */
export function minimumDetectableDifference(assumptions: PlanningAssumptions & { blocks: number }): number {
  const { alpha, power } = checkAssumptions(assumptions);
  const df = rcbdErrorDf(assumptions.treatments, assumptions.blocks);
  const tAlpha = jStat.studentt.inv(1 - alpha / 2, df);
  const tBeta = jStat.studentt.inv(power, df);
  return (tAlpha + tBeta) * Math.sqrt((2 * assumptions.mse) / assumptions.blocks);
}

/**
 * Smallest number of blocks (from 2) whose MDD is at most the target difference, or null when more
 * than `maxBlocks` would be needed. Same formula and source as minimumDetectableDifference.
 */
export function blocksNeeded(
  assumptions: PlanningAssumptions & { targetDifference: number; maxBlocks?: number },
): number | null {
  const { targetDifference, maxBlocks = 50 } = assumptions;
  checkAssumptions(assumptions);
  if (!Number.isFinite(targetDifference) || targetDifference <= 0) {
    throw new Error(`The difference worth detecting must be more than 0 (got ${targetDifference}).`);
  }
  for (let blocks = 2; blocks <= maxBlocks; blocks++) {
    if (minimumDetectableDifference({ ...assumptions, blocks }) <= targetDifference) return blocks;
  }
  return null;
}
