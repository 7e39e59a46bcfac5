import type { ModelData, Term } from "./model-data";

/**
 * Sum-to-zero ("effect") coding of a factor with L levels: level i < L−1 is the unit
 * vector e_i, the last level is −1 in every column. Each column sums to zero over levels,
 * so averaging a coded term over any factor's levels gives 0 — which makes a least-squares
 * mean simply the intercept plus the coded effects of the factors it names
 * (Searle, Speed & Milliken 1980, Am. Stat. 34:216–221).
 */
export function sumToZeroCode(level: number, levelCount: number): number[] {
  const row = new Array<number>(levelCount - 1).fill(0);
  if (level === levelCount - 1) row.fill(-1);
  else row[level] = 1;
  return row;
}

/** Mean of a covariate over the observed rows, used to centre it. */
function observedMean(x: readonly number[], y: readonly number[]): number {
  let sum = 0;
  let count = 0;
  x.forEach((v, i) => {
    if (Number.isFinite(y[i])) {
      sum += v;
      count += 1;
    }
  });
  return sum / count;
}

/**
 * Coded values of one crossed part for one observation: the Kronecker product of the
 * sum-to-zero codes of its factors (interaction columns are products of main-effect columns).
 * A covariate contributes its centred value.
 */
export function partRow(
  data: ModelData,
  part: readonly string[],
  obs: number,
  covariateCentres: Record<string, number>,
): number[] {
  let row = [1];
  for (const name of part) {
    const factor = data.factors[name];
    let codes: number[];
    if (factor) codes = sumToZeroCode(factor.codes[obs], factor.levels.length);
    else if (data.covariates[name]) codes = [data.covariates[name][obs] - covariateCentres[name]];
    else throw new Error(`the model names "${name}", which is neither a factor nor a covariate in the data`);
    const next: number[] = [];
    for (const a of row) for (const b of codes) next.push(a * b);
    row = next;
  }
  return row;
}

/** Number of columns a crossed part contributes: Π (levels − 1), or 1 per covariate. */
export function partWidth(data: ModelData, part: readonly string[]): number {
  return part.reduce((w, name) => w * (data.factors[name] ? data.factors[name].levels.length - 1 : 1), 1);
}

export interface DesignMatrix {
  /** One row per observation (including missing ones, so they can be predicted). */
  rows: number[][];
  /** Column range of each term, keyed by term label; column 0 is the intercept. */
  columns: Record<string, { start: number; end: number }>;
  covariateCentres: Record<string, number>;
}

/**
 * Design matrix X = [1 | term columns …] in sum-to-zero coding; covariates are centred
 * at their observed mean so the intercept is the mean response at the mean covariate.
 */
export function designMatrix(data: ModelData, terms: readonly Term[]): DesignMatrix {
  const covariateCentres: Record<string, number> = {};
  for (const [name, x] of Object.entries(data.covariates)) covariateCentres[name] = observedMean(x, data.y);
  const columns: DesignMatrix["columns"] = {};
  let next = 1;
  for (const term of terms) {
    const width = term.parts.reduce((w, part) => w + partWidth(data, part), 0);
    columns[term.label] = { start: next, end: next + width };
    next += width;
  }
  const rows = data.y.map((_, obs) => {
    const row = [1];
    for (const term of terms) for (const part of term.parts) row.push(...partRow(data, part, obs, covariateCentres));
    return row;
  });
  return { rows, columns, covariateCentres };
}
