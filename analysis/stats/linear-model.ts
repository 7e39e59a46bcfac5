import { designMatrix, partRow, type DesignMatrix } from "./design-matrix";
import { leastSquares, residualSumOfSquares, type LeastSquaresFit } from "./least-squares";
import { observedIndices, termFactors, type ModelData, type Term } from "./model-data";

export interface TermSums {
  label: string;
  df: number;
  ss: number;
}

export type FitMethod = "closed-form" | "least-squares";

export interface LinearModelFit {
  method: FitMethod;
  /** All observations, missing ones included (y = NaN). */
  data: ModelData;
  terms: Term[];
  /** Indices (into data) of the observations with a response. */
  observed: number[];
  /** Type II sums of squares: each term adjusted for every term that does not contain it. */
  termSums: TermSums[];
  residual: { df: number; ss: number };
  /** Corrected total over the observed values: Σ(y − ȳ)², n − 1 df. */
  total: { df: number; ss: number };
  /** Per observed row (same order as `observed`). */
  fitted: number[];
  residuals: number[];
  leverage: number[];
  /** Least-squares prediction for each missing observation (the missing-plot estimate). */
  missingPredictions: { index: number; value: number }[];
  /** Present for least-squares fits: the design and the QR solution. */
  leastSquares?: { design: DesignMatrix; fit: LeastSquaresFit };
}

/**
 * Cell index of every observation for a set of factors: the mixed-radix number of its level
 * codes (first factor slowest), and the number of cells. Integer keys keep large balanced
 * analyses fast.
 */
export function cellIndices(data: ModelData, factors: readonly string[]): { index: Int32Array; cells: number } {
  const n = data.y.length;
  const index = new Int32Array(n);
  let cells = 1;
  for (const f of factors) {
    const { codes, levels } = data.factors[f];
    for (let obs = 0; obs < n; obs++) index[obs] = index[obs] * levels.length + codes[obs];
    cells *= levels.length;
  }
  return { index, cells };
}

/**
 * True when every combination of the model's factor levels holds the same number (≥ 1) of
 * observed values and there is no covariate: the terms are then orthogonal and the sums of
 * squares have closed forms.
 */
export function isBalanced(data: ModelData, terms: readonly Term[]): boolean {
  if (data.y.some((v) => !Number.isFinite(v))) return false;
  const names = [...new Set(terms.flatMap(termFactors))];
  if (names.some((name) => !data.factors[name])) return false;
  const { index, cells } = cellIndices(data, names);
  const counts = new Int32Array(cells);
  for (const cell of index) counts[cell] += 1;
  return counts.every((c) => c > 0 && c === counts[0]);
}

function allSubsets<T>(items: readonly T[]): T[][] {
  return items.reduce<T[][]>((subsets, item) => subsets.concat(subsets.map((s) => [...s, item])), [[]]);
}

/** Marginal means of y over every subset of the given factors: per subset, each observation's cell and the cell means. */
function marginalMeans(data: ModelData, factors: readonly string[]): Map<string, { index: Int32Array; means: Float64Array }> {
  const out = new Map<string, { index: Int32Array; means: Float64Array }>();
  for (const subset of allSubsets(factors)) {
    const { index, cells } = cellIndices(data, subset);
    const sums = new Float64Array(cells);
    const counts = new Float64Array(cells);
    for (let obs = 0; obs < data.y.length; obs++) {
      sums[index[obs]] += data.y[obs];
      counts[index[obs]] += 1;
    }
    out.set(subset.join(":"), { index, means: sums.map((sum, c) => sum / counts[c]) });
  }
  return out;
}

/**
 * Closed-form sums of squares for balanced crossed data. The effect of a crossed factor set S
 * in a cell is the inclusion–exclusion of marginal means, Σ_{T⊆S} (−1)^{|S|−|T|} ȳ_T
 * (e.g. ȳ_ij − ȳ_i − ȳ_j + ȳ for A:B), SS(S) = Σ_obs effect², df(S) = Π(levels − 1);
 * the residual is what the terms leave of the corrected total (Montgomery, DAE, ch. 5).
 */
export function closedFormFit(data: ModelData, terms: readonly Term[]): Omit<LinearModelFit, "data" | "terms"> {
  const n = data.y.length;
  const names = [...new Set(terms.flatMap(termFactors))];
  const means = marginalMeans(data, names);
  const grand = means.get("")!.means[0];
  const fitted = new Array<number>(n).fill(grand);
  const termSums = terms.map((term) => {
    let ss = 0;
    let df = 0;
    for (const part of term.parts) {
      const ordered = names.filter((f) => part.includes(f));
      df += ordered.reduce((d, f) => d * (data.factors[f].levels.length - 1), 1);
      const subsets = allSubsets(ordered).map((s) => ({
        sign: (ordered.length - s.length) % 2 === 0 ? 1 : -1,
        ...means.get(s.join(":"))!,
      }));
      for (let obs = 0; obs < n; obs++) {
        let effect = 0;
        // Indexed, not for…of: this loop runs terms × subsets × observations times.
        for (let k = 0; k < subsets.length; k++) effect += subsets[k].sign * subsets[k].means[subsets[k].index[obs]];
        ss += effect * effect;
        fitted[obs] += effect;
      }
    }
    return { label: term.label, df, ss };
  });
  const totalSs = data.y.reduce((s, v) => s + (v - grand) ** 2, 0);
  const modelDf = termSums.reduce((s, t) => s + t.df, 0);
  const residuals = data.y.map((v, i) => v - fitted[i]);
  return {
    method: "closed-form",
    observed: data.y.map((_, i) => i),
    termSums,
    residual: { df: n - 1 - modelDf, ss: residuals.reduce((s, e) => s + e * e, 0) },
    total: { df: n - 1, ss: totalSs },
    fitted,
    residuals,
    leverage: new Array<number>(n).fill((1 + modelDf) / n),
    missingPredictions: [],
  };
}

/**
 * Least-squares fit by QR with type II sums of squares: for term T, SS(T) = RSS(model without T
 * and the terms containing T) − RSS(model without the terms containing T), df = the rank
 * difference (Langsrud 2003, Stat. Comput. 13:163–167; Fox & Weisberg, An R Companion to Applied
 * Regression, 3rd ed., §5.3.4). Missing responses are left out of the fit and predicted from it.
 */
export function leastSquaresModelFit(data: ModelData, terms: readonly Term[]): Omit<LinearModelFit, "data" | "terms"> {
  const design = designMatrix(data, terms);
  const observed = observedIndices(data);
  if (observed.length === 0) throw new Error("there are no observed values to analyse");
  const rows = observed.map((i) => design.rows[i]);
  const y = observed.map((i) => data.y[i]);
  const fit = leastSquares(rows, y);
  const columnCount = rows[0].length;

  const cache = new Map<string, { rss: number; rank: number }>();
  const rssWithout = (dropped: ReadonlySet<string>) => {
    const key = [...dropped].sort().join("|");
    let result = cache.get(key);
    if (!result) {
      const columns: number[] = [];
      for (let j = 0; j < columnCount; j++) {
        const owner = terms.find((t) => j >= design.columns[t.label].start && j < design.columns[t.label].end);
        if (!owner || !dropped.has(owner.label)) columns.push(j);
      }
      result = residualSumOfSquares(rows, y, columns);
      cache.set(key, result);
    }
    return result;
  };

  const termSums = terms.map((term) => {
    const own = termFactors(term);
    const containing = terms.filter(
      (other) => other !== term && own.every((f) => termFactors(other).includes(f)),
    );
    const dropContaining = new Set(containing.map((t) => t.label));
    const reduced = rssWithout(dropContaining);
    const smaller = rssWithout(new Set([...dropContaining, term.label]));
    return { label: term.label, df: reduced.rank - smaller.rank, ss: Math.max(0, smaller.rss - reduced.rss) };
  });

  const mean = y.reduce((s, v) => s + v, 0) / y.length;
  const missingPredictions = data.y.flatMap((v, index) => {
    if (Number.isFinite(v)) return [];
    const x = design.rows[index];
    const value = x.reduce((s, xj, j) => (fit.aliased[j] ? s : s + xj * fit.coefficients[j]), 0);
    return [{ index, value }];
  });
  return {
    method: "least-squares",
    observed,
    termSums,
    residual: { df: y.length - fit.rank, ss: fit.rss },
    total: { df: y.length - 1, ss: y.reduce((s, v) => s + (v - mean) ** 2, 0) },
    fitted: fit.fitted,
    residuals: fit.residuals,
    leverage: fit.leverage,
    missingPredictions,
    leastSquares: { design, fit },
  };
}

/**
 * Fits a linear model with the given terms: closed-form sums of squares when the data are
 * balanced, least squares by QR otherwise (or whichever `method` forces).
 */
export function fitLinearModel(
  data: ModelData,
  terms: readonly Term[],
  method: FitMethod | "auto" = "auto",
): LinearModelFit {
  const balanced = method !== "least-squares" && isBalanced(data, terms);
  const chosen = method === "auto" ? (balanced ? "closed-form" : "least-squares") : method;
  if (chosen === "closed-form" && !balanced) {
    throw new Error("closed-form sums of squares need balanced data with no missing values");
  }
  const core = chosen === "closed-form" ? closedFormFit(data, terms) : leastSquaresModelFit(data, terms);
  return { ...core, data, terms: [...terms] };
}

export interface CellMeans {
  /** Factor names the means are over, e.g. ["treatment"] or ["A", "B"]. */
  factors: string[];
  /** Level of each factor for each mean. */
  levels: string[][];
  means: number[];
  /** Observed values behind each mean. */
  n: number[];
  /** Var(means) / σ²: the unscaled covariance matrix of the least-squares means. */
  unscaledCovariance: number[][];
}

/** Every combination of the given factors' levels, first factor slowest. */
function levelCombinations(data: ModelData, factors: readonly string[]): number[][] {
  return factors.reduce<number[][]>(
    (combos, f) => combos.flatMap((c) => data.factors[f].levels.map((_, i) => [...c, i])),
    [[]],
  );
}

/**
 * Least-squares means of every combination of the given factors: the model's prediction with
 * the other factors averaged over their levels and covariates at their mean (Searle, Speed &
 * Milliken 1980). With sum-to-zero coding this is L·b where L holds the intercept and the codes
 * of the terms made only of these factors; Var = σ² L(X'X)⁻¹L'. For balanced data they are
 * the raw marginal means with variance σ²/n.
 */
export function leastSquaresMeans(fit: LinearModelFit, factors: readonly string[]): CellMeans {
  const { data } = fit;
  for (const f of factors) if (!data.factors[f]) throw new Error(`the model has no factor "${f}"`);
  const combos = levelCombinations(data, factors);
  // Combination index of an observation: mixed-radix number of its level codes (first factor slowest).
  const comboIndex = (obs: number) => factors.reduce((idx, f) => idx * data.factors[f].levels.length + data.factors[f].codes[obs], 0);
  const n = new Array<number>(combos.length).fill(0);
  const sums = new Array<number>(combos.length).fill(0);
  for (const obs of fit.observed) {
    n[comboIndex(obs)] += 1;
    sums[comboIndex(obs)] += data.y[obs];
  }
  const levels = combos.map((combo) => combo.map((level, k) => data.factors[factors[k]].levels[level]));

  if (fit.method === "closed-form") {
    const means = sums.map((sum, c) => sum / n[c]);
    const unscaledCovariance = combos.map((_, i) => {
      const row = new Array<number>(combos.length).fill(0);
      row[i] = 1 / n[i];
      return row;
    });
    return { factors: [...factors], levels, means, n, unscaledCovariance };
  }

  const { design, fit: ls } = fit.leastSquares!;
  const width = ls.coefficients.length;
  const lRows = combos.map((combo) => {
    // A pseudo-observation carrying these levels; other factors are irrelevant since their codes are zeroed.
    const pseudo: ModelData = {
      y: [0],
      factors: Object.fromEntries(
        Object.entries(data.factors).map(([name, f]) => {
          const k = factors.indexOf(name);
          return [name, { ...f, codes: [k >= 0 ? combo[k] : 0] }];
        }),
      ),
      covariates: Object.fromEntries(Object.keys(data.covariates).map((name) => [name, [design.covariateCentres[name]]])),
    };
    const l = new Array<number>(width).fill(0);
    l[0] = 1;
    for (const term of fit.terms) {
      let col = design.columns[term.label].start;
      for (const part of term.parts) {
        const row = partRow(pseudo, part, 0, design.covariateCentres);
        const inside = part.every((f) => factors.includes(f));
        row.forEach((v, k) => {
          if (inside) l[col + k] = v;
        });
        col += row.length;
      }
    }
    return l;
  });
  lRows.forEach((l, c) => {
    if (l.some((v, j) => v !== 0 && ls.aliased[j])) {
      throw new Error(
        `the least-squares mean for ${levels[c].join(":")} cannot be estimated: some combination of ${factors.join(" and ")} has no observed value`,
      );
    }
  });
  const dot = (a: number[], b: number[]) => a.reduce((s, v, j) => (v === 0 || ls.aliased[j] ? s : s + v * b[j]), 0);
  const means = lRows.map((l) => dot(l, ls.coefficients));
  const vl = lRows.map((l) => ls.unscaledCovariance.map((row) => dot(l, row)));
  const unscaledCovariance = lRows.map((li) => vl.map((vlj) => dot(li, vlj)));
  return { factors: [...factors], levels, means, n, unscaledCovariance };
}
