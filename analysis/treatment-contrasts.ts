// Contrasts as researchers write them — one coefficient per treatment code — mapped onto the means
// of an analysis. Pure: plain records in, plain objects out.
import type { FittedResults, TreatmentInfo } from "./results";
import {
  checkOrthogonality,
  orthogonalPolynomialContrasts,
  testContrast,
  treatmentVsCheckContrasts,
  type ContrastResult,
} from "./stats";

/** A named contrast over treatment codes; codes left out have coefficient 0. */
export interface TreatmentContrast {
  name: string;
  coefficients: Record<string, number>;
}

export interface ContrastPreset {
  id: string;
  label: string;
  contrasts: TreatmentContrast[];
}

const numberText = (v: number) => (Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(6)))).replace("-", "−");

/**
 * Why a set of coefficients is not a contrast, in words a researcher acts on; null when it is one.
 * A contrast's coefficients are finite, not all zero, and sum to zero (Montgomery, DAE, §3.5.4).
 */
export function contrastProblem(coefficients: Record<string, number>): string | null {
  const values = Object.values(coefficients);
  if (values.some((v) => !Number.isFinite(v))) return "Every coefficient must be a number.";
  const scale = Math.max(0, ...values.map(Math.abs));
  if (scale === 0) return "At least one coefficient must be non-zero.";
  const sum = values.reduce((s, v) => s + v, 0);
  if (Math.abs(sum) > 1e-9 * scale) {
    return `The coefficients sum to ${numberText(sum)}; a contrast's coefficients must sum to zero (for example 1 and −1, or 2, −1 and −1).`;
  }
  return null;
}

/** Coefficients in the order of `codes`, 0 for a code the contrast leaves out. */
export function coefficientVector(contrast: TreatmentContrast, codes: readonly string[]): number[] {
  return codes.map((code) => contrast.coefficients[code] ?? 0);
}

/**
 * Pairs of contrasts in a set that are not orthogonal, Σ c_i d_i ≠ 0 over the treatments
 * (equal replication, as designed; Montgomery, DAE, §3.5.5). Empty when the set is orthogonal.
 */
export function nonOrthogonalPairs(contrasts: readonly TreatmentContrast[], codes: readonly string[]): { a: string; b: string; product: number }[] {
  if (contrasts.length < 2) return [];
  const check = checkOrthogonality(contrasts.map((c) => ({ name: c.name, coefficients: coefficientVector(c, codes) })));
  if (check.orthogonal) return [];
  return check.pairs.filter((p) => Math.abs(p.product) > 1e-9);
}

/** Numeric levels of a factor, sorted, when every treatment has one; null otherwise. */
function numericLevels(treatments: readonly TreatmentInfo[], factor: string): number[] | null {
  const values = treatments.map((t) => t.factorLevels?.[factor]);
  if (values.some((v) => v === undefined || v.trim() === "" || !Number.isFinite(Number(v)))) return null;
  return [...new Set(values.map(Number))].sort((a, b) => a - b);
}

function equallySpaced(levels: readonly number[]): boolean {
  const step = levels[1] - levels[0];
  return levels.every((v, i) => i === 0 || Math.abs(v - levels[i - 1] - step) <= 1e-9 * Math.max(1, Math.abs(step)));
}

/**
 * Ready-made sets: each treatment against the untreated check, and, for every factor whose levels
 * are equally spaced numbers (a rate), the orthogonal polynomials over its levels (Fisher & Yates
 * tables; with other factors present each treatment takes the coefficient of its level).
 * `unavailable` says why a factor with numeric levels gets no polynomial set.
 */
export function contrastPresets(treatments: readonly TreatmentInfo[]): { presets: ContrastPreset[]; unavailable: string[] } {
  const codes = treatments.map((t) => t.code);
  const presets: ContrastPreset[] = [];
  const unavailable: string[] = [];
  const check = treatments.find((t) => t.isCheck);
  if (check && codes.length >= 2) {
    presets.push({
      id: "vs-check",
      label: "Each treatment vs the check",
      contrasts: treatmentVsCheckContrasts(codes, check.code).map((spec) => ({
        name: spec.name,
        coefficients: Object.fromEntries(codes.map((code, i) => [code, spec.coefficients[i]])),
      })),
    });
  } else if (!check) {
    unavailable.push("No treatment is marked as the check, so there is no treatment-vs-check set.");
  }
  const factors = [...new Set(treatments.flatMap((t) => Object.keys(t.factorLevels ?? {})))];
  for (const factor of factors) {
    const levels = numericLevels(treatments, factor);
    if (!levels) continue;
    if (levels.length < 3) {
      unavailable.push(`${factor} has ${levels.length} levels; polynomial contrasts need at least 3.`);
      continue;
    }
    if (!equallySpaced(levels)) {
      unavailable.push(`${factor} levels ${levels.join(", ")} are not equally spaced; the tabulated polynomial coefficients assume equal spacing.`);
      continue;
    }
    const position = new Map(levels.map((v, i) => [v, i]));
    presets.push({
      id: `poly-${factor}`,
      label: `Polynomial trend over ${factor} (${levels.join(", ")})`,
      contrasts: orthogonalPolynomialContrasts(levels.length, Math.min(levels.length - 1, 3)).map((spec) => ({
        name: `${factor}: ${spec.name}`,
        coefficients: Object.fromEntries(
          treatments.map((t) => [t.code, spec.coefficients[position.get(Number(t.factorLevels![factor]))!]]),
        ),
      })),
    });
  }
  return { presets, unavailable };
}

export type ContrastOutcome =
  | { name: string; coefficients: Record<string, number>; result: ContrastResult; error: null }
  | { name: string; coefficients: Record<string, number>; result: null; error: string };

/**
 * Each contrast tested on the treatment means of an analysis (`testContrast`: estimate, SE from the
 * error strata involved, t, df, F, p and the 100(1 − α) % CI). A contrast that no longer fits the
 * trial (a treatment it names is gone, or it no longer sums to zero) gets an error instead.
 */
export function testTreatmentContrasts(fitted: FittedResults, contrasts: readonly TreatmentContrast[], alpha: number): ContrastOutcome[] {
  const set = fitted.anova.means[fitted.term];
  const codes = set.labels.map((label) => fitted.labelToCode.get(label) ?? label);
  return contrasts.map((contrast) => {
    const unknown = Object.keys(contrast.coefficients).filter((code) => contrast.coefficients[code] !== 0 && !codes.includes(code));
    if (unknown.length > 0) {
      return { ...contrast, result: null, error: `Treatment ${unknown.join(", ")} is not in this analysis; edit or delete the contrast.` };
    }
    const problem = contrastProblem(Object.fromEntries(codes.map((c) => [c, contrast.coefficients[c] ?? 0])));
    if (problem) return { ...contrast, result: null, error: problem };
    try {
      return { ...contrast, result: testContrast(set, { name: contrast.name, coefficients: coefficientVector(contrast, codes) }, alpha), error: null };
    } catch (error) {
      return { ...contrast, result: null, error: error instanceof Error ? error.message : String(error) };
    }
  });
}
