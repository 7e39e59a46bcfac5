import { MeasurementError } from "./errors";

/** A sampled layer, depths in cm below the soil surface. */
export interface DepthIncrement {
  topCm: number;
  bottomCm: number;
}

/** Depths closer than this are the same depth (guards against 9.999999 vs 10 from unit conversion). */
const SAME_DEPTH_CM = 1e-9;

const label = (d: DepthIncrement) => `${d.topCm}–${d.bottomCm} cm`;

/**
 * Everything wrong with a set of depth increments, as sentences; empty when the increments run
 * contiguously from the surface (0 cm) with no gaps or overlaps. Order of input does not matter.
 * Rule: stocks summed over increments need the whole column once (DESIGN.md, "SOC stock").
 */
export function depthIncrementProblems(increments: readonly DepthIncrement[]): string[] {
  if (increments.length === 0) return ["Add at least one depth increment (for example 0–10 cm)."];
  const problems: string[] = [];
  for (const d of increments) {
    if (!Number.isFinite(d.topCm) || !Number.isFinite(d.bottomCm)) {
      problems.push(`Depth increment ${label(d)} needs numeric top and bottom depths.`);
    } else if (d.topCm < 0) {
      problems.push(`Depth increment ${label(d)} starts above the soil surface; depths are measured down from 0 cm.`);
    } else if (d.bottomCm <= d.topCm) {
      problems.push(`Depth increment ${label(d)} must have its bottom deeper than its top.`);
    }
  }
  if (problems.length > 0) return problems;

  const sorted = [...increments].sort((a, b) => a.topCm - b.topCm || a.bottomCm - b.bottomCm);
  if (Math.abs(sorted[0].topCm) > SAME_DEPTH_CM) {
    problems.push(
      `The shallowest increment starts at ${sorted[0].topCm} cm; increments must start at the surface (0 cm).`,
    );
  }
  for (let i = 1; i < sorted.length; i++) {
    const above = sorted[i - 1];
    const below = sorted[i];
    const step = below.topCm - above.bottomCm;
    if (step > SAME_DEPTH_CM) {
      problems.push(
        `Gap between ${label(above)} and ${label(below)}: nothing is sampled from ${above.bottomCm} to ${below.topCm} cm.`,
      );
    } else if (step < -SAME_DEPTH_CM) {
      problems.push(`${label(above)} and ${label(below)} overlap; each depth must belong to one increment.`);
    }
  }
  return problems;
}

/**
 * The increments sorted from the surface down, after checking they are contiguous from 0 cm;
 * throws a MeasurementError listing every problem otherwise.
 */
export function contiguousDepthIncrements<T extends DepthIncrement>(increments: readonly T[]): T[] {
  const problems = depthIncrementProblems(increments);
  if (problems.length > 0) throw new MeasurementError(problems.join(" "), "depth");
  return [...increments].sort((a, b) => a.topCm - b.topCm);
}
