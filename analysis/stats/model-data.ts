/**
 * The data a linear model sees: one response per observation, categorical factors coded
 * by level index, and optional numeric covariates. Levels keep their order of first appearance.
 */
export interface Factor {
  name: string;
  levels: string[];
  /** Level index of each observation. */
  codes: number[];
}

export interface ModelData {
  /** Response of each observation; NaN marks a missing value (kept for prediction). */
  y: number[];
  factors: Record<string, Factor>;
  covariates: Record<string, number[]>;
}

/**
 * A model term: the sum of one or more crossed factor sets. Most terms have one part
 * (`block`, `A:B`); a nested term such as plot(treatment) pools several parts
 * (`rep` and `treatment:rep`). A covariate term names the covariate as its only factor.
 */
export interface Term {
  label: string;
  parts: string[][];
}

/** A term made of one crossed set of factors, labelled the usual way (`A:B`). */
export function crossedTerm(...factors: string[]): Term {
  return { label: factors.join(":"), parts: [factors] };
}

/** Every factor (or covariate) a term involves. */
export function termFactors(term: Term): string[] {
  return [...new Set(term.parts.flat())];
}

/** A factor from one label per observation; levels in order of first appearance. */
export function factorFromLabels(name: string, labels: readonly string[]): Factor {
  const index = new Map<string, number>();
  const codes = labels.map((label) => {
    let code = index.get(label);
    if (code === undefined) {
      code = index.size;
      index.set(label, code);
    }
    return code;
  });
  return { name, levels: [...index.keys()], codes };
}

/** Indices of the observations whose response is present. */
export function observedIndices(data: ModelData): number[] {
  const out: number[] = [];
  data.y.forEach((v, i) => {
    if (Number.isFinite(v)) out.push(i);
  });
  return out;
}
