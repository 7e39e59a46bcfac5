// The outlier check of lab intake, per sampling event and depth. Pure.
import { median } from "simple-statistics";
import { rcbdAnova, rowOf, studentizedResiduals } from "../../../analysis/stats";

export interface OutlierPoint {
  key: string;
  block: string;
  treatment: string;
  value: number;
}

export interface OutlierScore {
  score: number;
  method: "studentized" | "robust";
  flagged: boolean;
}

/** |studentized residual| above this is flagged (DESIGN.md, Diagnostics). */
export const STUDENTIZED_LIMIT = 3;
/** |modified z| above this is flagged (Iglewicz & Hoaglin 1993, "How to Detect and Handle Outliers", ASQC). */
export const ROBUST_Z_LIMIT = 3.5;
/** Error df the RCBD check needs before it replaces the robust one. */
export const MIN_ERROR_DF = 10;

/**
 * Scores every point of one event × depth. With every treatment in at least two blocks and at
 * least ten error df, the RCBD model y = μ + block + treatment + ε is fitted (missing plots by
 * least squares) and each point gets its internally studentized residual, flagged at |r| > 3.
 * Before the event has that much data, each point gets a modified z-score,
 * 0.6745·(x − treatment median)/MAD, flagged at |z| > 3.5 (Iglewicz & Hoaglin 1993); the MAD is
 * pooled over treatments with three or more values, and when it is 0 the mean absolute deviation
 * × 1.2533 stands in for it (the same source's fallback).
 */
export function outlierScores(points: readonly OutlierPoint[]): Map<string, OutlierScore> {
  return studentizedScores(points) ?? robustScores(points);
}

function studentizedScores(points: readonly OutlierPoint[]): Map<string, OutlierScore> | null {
  const blocks = [...new Set(points.map((p) => p.block))];
  const treatments = [...new Set(points.map((p) => p.treatment))];
  if (blocks.length < 2 || treatments.length < 2) return null;
  const cells = new Map<string, OutlierPoint>();
  for (const p of points) {
    const cell = `${p.block}\u0000${p.treatment}`;
    if (cells.has(cell)) return null;
    cells.set(cell, p);
  }
  for (const t of treatments) {
    if (points.filter((p) => p.treatment === t).length < 2) return null;
  }
  // An internally studentized residual cannot exceed √(error df) (Cook & Weisberg 1982,
  // Residuals and Influence in Regression, ch. 2; from memory), so below 10 df no point could pass 3.
  const errorDf = points.length - blocks.length - treatments.length + 1;
  if (errorDf < MIN_ERROR_DF) return null;
  const plots = blocks.flatMap((block) =>
    treatments.map((treatment) => ({ block, treatment, value: cells.get(`${block}\u0000${treatment}`)?.value ?? null })),
  );
  try {
    // Only the studentized residuals are needed here, not the full diagnostics (normality tests, Q–Q).
    const { fit, table } = rcbdAnova(plots);
    const studentized = studentizedResiduals(fit.residuals, fit.leverage, rowOf(table, "residual").ms ?? Number.NaN);
    const scores = new Map<string, OutlierScore>();
    for (const [k, index] of fit.observed.entries()) {
      const point = cells.get(`${plots[index].block}\u0000${plots[index].treatment}`)!;
      const r = studentized[k];
      if (!Number.isFinite(r)) return null;
      scores.set(point.key, { score: r, method: "studentized", flagged: Math.abs(r) > STUDENTIZED_LIMIT });
    }
    return scores;
  } catch {
    return null;
  }
}

function robustScores(points: readonly OutlierPoint[]): Map<string, OutlierScore> {
  const byTreatment = new Map<string, OutlierPoint[]>();
  for (const p of points) byTreatment.set(p.treatment, [...(byTreatment.get(p.treatment) ?? []), p]);
  const deviations = new Map<string, number>();
  for (const group of byTreatment.values()) {
    if (group.length < 3) continue;
    const m = median(group.map((p) => p.value));
    for (const p of group) deviations.set(p.key, p.value - m);
  }
  const scores = new Map<string, OutlierScore>();
  if (deviations.size === 0) return scores;
  const absolute = [...deviations.values()].map(Math.abs);
  const mad = median(absolute);
  const meanAd = absolute.reduce((a, b) => a + b, 0) / absolute.length;
  for (const [key, d] of deviations) {
    let score: number;
    if (mad > 0) score = (0.6745 * d) / mad;
    else if (meanAd > 0) score = d / (1.2533 * meanAd);
    else continue;
    scores.set(key, { score, method: "robust", flagged: Math.abs(score) > ROBUST_Z_LIMIT });
  }
  return scores;
}
