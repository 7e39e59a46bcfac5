import { factorFromLabels, type ModelData } from "./model-data";

/** A plot's response; `null` (or an empty cell upstream) means the value is missing. */
export type PlotValue = number | null;

/**
 * A plot described by the level of each design factor, e.g.
 * `{ levels: { block: "1", treatment: "T2" }, value: 3.1 }`.
 */
export interface LeveledPlot {
  levels: Record<string, string>;
  value: PlotValue;
}

function describe(levels: Record<string, string>, names: readonly string[]): string {
  return names.map((n) => `${n} ${levels[n]}`).join(", ");
}

/** Throws when a response is neither a finite number nor null. */
export function checkValues(plots: readonly LeveledPlot[], names: readonly string[]): void {
  for (const plot of plots) {
    for (const name of names) {
      if (plot.levels[name] === undefined || plot.levels[name] === "") {
        throw new Error(`a plot has no ${name} (${describe(plot.levels, names.filter((n) => n !== name))})`);
      }
    }
    if (plot.value !== null && !Number.isFinite(plot.value)) {
      throw new Error(`${describe(plot.levels, names)}: the value "${String(plot.value)}" is not a number`);
    }
  }
}

/** Levels of one factor in order of first appearance. */
export function levelsOf(plots: readonly LeveledPlot[], name: string): string[] {
  return [...new Set(plots.map((p) => p.levels[name]))];
}

/**
 * Checks that every combination of the crossed factors has a plot — exactly one unless
 * `replicated` — (a missing value is a plot with value null), naming the first gap or
 * duplicate found: "block 3 has no plot for treatment T2".
 */
export function checkComplete(plots: readonly LeveledPlot[], names: readonly string[], replicated = false): void {
  const levels = names.map((n) => levelsOf(plots, n));
  const position = levels.map((ls) => new Map(ls.map((l, i) => [l, i])));
  // Combination index: mixed-radix number of the level positions, first factor slowest.
  const combinations = levels.reduce((c, ls) => c * ls.length, 1);
  const counts = new Int32Array(combinations);
  for (const p of plots) {
    let index = 0;
    names.forEach((n, k) => (index = index * levels[k].length + position[k].get(p.levels[n])!));
    counts[index] += 1;
  }
  for (let index = 0; index < combinations; index++) {
    const count = counts[index];
    if (count === 1 || (replicated && count > 1)) continue;
    const combo: string[] = [];
    for (let k = names.length - 1, remainder = index; k >= 0; k--) {
      combo[k] = levels[k][remainder % levels[k].length];
      remainder = Math.floor(remainder / levels[k].length);
    }
    const [first, ...rest] = names.map((n, k) => `${n} ${combo[k]}`);
    const what = rest.length ? ` for ${rest.join(", ")}` : "";
    if (count === 0) throw new Error(`${first} has no plot${what} (give the plot with an empty value if it was lost)`);
    throw new Error(`${first} has ${count} plots${what}; expected one`);
  }
}

/** Throws unless a factor has at least `minimum` levels. */
export function checkLevelCount(plots: readonly LeveledPlot[], name: string, minimum: number, why: string): void {
  const count = levelsOf(plots, name).length;
  if (count < minimum) throw new Error(`${why} needs at least ${minimum} levels of ${name}; the data have ${count}`);
}

/** Throws when some level of a factor has no observed (non-missing) value. */
export function checkObservedLevels(plots: readonly LeveledPlot[], name: string): void {
  const observed = new Set(plots.filter((p) => p.value !== null).map((p) => p.levels[name]));
  for (const level of levelsOf(plots, name)) {
    if (!observed.has(level)) throw new Error(`${name} ${level} has no observed value`);
  }
}

/** Model data with one factor per name (levels in order of first appearance). */
export function toModelData(plots: readonly LeveledPlot[], names: readonly string[], covariates: Record<string, number[]> = {}): ModelData {
  return {
    y: plots.map((p) => (p.value === null ? Number.NaN : p.value)),
    factors: Object.fromEntries(names.map((n) => [n, factorFromLabels(n, plots.map((p) => p.levels[n]))])),
    covariates,
  };
}
