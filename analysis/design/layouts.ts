import { mulberry32, shuffled, type UniformSource } from "./random";

export type TrialDesign = "completely_randomized" | "rcbd" | "factorial_rcbd" | "split_plot";

/**
 * How plot numbers run through the field. Straight: every strip is numbered from the same end.
 * Serpentine: alternate strips are numbered back the other way, so numbers follow the path a
 * crew walks (common practice).
 */
export type FieldArrangement = "straight" | "serpentine";

/** A factor of a factorial or split-plot trial, e.g. { name: "rate", levels: ["0", "10", "20"] }. */
export interface Factor {
  name: string;
  levels: readonly string[];
}

/** One treatment made of factor levels; its code joins the levels in factor order. */
export interface FactorCombination {
  code: string;
  levels: Record<string, string>;
}

export interface LayoutPlot {
  /** strip × 100 + position: 101, 102 … 201 … (common field convention). */
  plotNumber: number;
  /** Block (replicate) number from 1; null in a completely randomized design. */
  block: number | null;
  /**
   * The run of adjacent plots the plot lies in — its block, or in a completely randomized design its
   * field row. (A layout word only; nothing to do with the strip-plot design.)
   */
  strip: number;
  /** Order of the plot number within its strip, from 1. */
  position: number;
  /** Physical slot within the strip, from 1, counted from the same end of the field for every strip. */
  column: number;
  treatment: string;
  /** Factorial and split-plot designs: factor name → level. */
  levels?: Record<string, string>;
  /** Split-plot designs: main plot number within the block, from 1. */
  mainPlot?: number;
}

export interface FieldLayout {
  design: TrialDesign;
  seed: number;
  arrangement: FieldArrangement;
  /** Plots in plot-number order. */
  plots: LayoutPlot[];
}

/** The plot-number convention leaves two digits for the position within a strip. */
const MAX_PLOTS_PER_STRIP = 99;

/** Separator between factor levels in a combination's code. */
export const LEVEL_SEPARATOR = " × ";

function requireDistinctNonEmpty(values: readonly string[], what: string, minimum: number): void {
  if (values.length < minimum) throw new Error(`A layout needs at least ${minimum} ${what} (got ${values.length}).`);
  const seen = new Set<string>();
  for (const v of values) {
    if (typeof v !== "string" || v.trim() === "") throw new Error(`Every one of the ${what} needs a non-empty code.`);
    if (seen.has(v)) throw new Error(`"${v}" appears twice among the ${what}; codes must be unique.`);
    seen.add(v);
  }
}

function requireCount(n: number, what: string, minimum: number): void {
  if (!Number.isInteger(n) || n < minimum)
    throw new Error(`The number of ${what} must be a whole number of at least ${minimum} (got ${n}).`);
}

function requireStripWidth(width: number): void {
  if (width > MAX_PLOTS_PER_STRIP) {
    throw new Error(
      `A block or field row can hold at most ${MAX_PLOTS_PER_STRIP} plots when plots are numbered block × 100 + position ` +
        `(this design puts ${width} in one).`,
    );
  }
}

/** Physical slot of a numbered position: serpentine reverses every second strip. */
function columnOf(strip: number, position: number, width: number, arrangement: FieldArrangement): number {
  return arrangement === "serpentine" && strip % 2 === 0 ? width - position + 1 : position;
}

interface PlannedPlot {
  treatment: string;
  levels?: Record<string, string>;
  mainPlot?: number;
}

/** Numbers the plots of each strip in order and places them in the field. */
function numberStrips(
  strips: readonly (readonly PlannedPlot[])[],
  width: number,
  blocked: boolean,
  arrangement: FieldArrangement,
): LayoutPlot[] {
  return strips.flatMap((plots, s) => {
    const strip = s + 1;
    return plots.map((p, i) => {
      const position = i + 1;
      return {
        plotNumber: strip * 100 + position,
        block: blocked ? strip : null,
        strip,
        position,
        column: columnOf(strip, position, width, arrangement),
        treatment: p.treatment,
        ...(p.levels ? { levels: p.levels } : {}),
        ...(p.mainPlot !== undefined ? { mainPlot: p.mainPlot } : {}),
      };
    });
  });
}

/** Every combination of the factors' levels, first factor varying slowest (e.g. A1 × B1, A1 × B2, A2 × B1 …). */
export function factorialCombinations(factors: readonly Factor[]): FactorCombination[] {
  if (factors.length < 1) throw new Error("A factorial needs at least one factor.");
  requireDistinctNonEmpty(
    factors.map((f) => f.name),
    "factor names",
    1,
  );
  for (const f of factors) requireDistinctNonEmpty(f.levels, `levels of factor "${f.name}"`, 2);
  let combos: Record<string, string>[] = [{}];
  for (const f of factors) {
    combos = combos.flatMap((c) => f.levels.map((level) => ({ ...c, [f.name]: level })));
  }
  return combos.map((levels) => ({
    code: factors.map((f) => levels[f.name]).join(LEVEL_SEPARATOR),
    levels,
  }));
}

export interface CompletelyRandomizedLayoutOptions {
  treatments: readonly string[];
  replicates: number;
  seed: number;
  arrangement?: FieldArrangement;
  /** Plots per field row; default the number of treatments. */
  plotsPerRow?: number;
}

/**
 * Completely randomized design: each treatment `replicates` times, all plots shuffled together
 * (Fisher–Yates with a seeded Mulberry32), then laid out row by row.
 * Source: Cochran & Cox 1957, Experimental Designs, ch. 4 (from memory).
 */
export function completelyRandomizedLayout({
  treatments,
  replicates,
  seed,
  arrangement = "straight",
  plotsPerRow = treatments.length,
}: CompletelyRandomizedLayoutOptions): FieldLayout {
  requireDistinctNonEmpty(treatments, "treatments", 2);
  requireCount(replicates, "replicates", 1);
  requireCount(plotsPerRow, "plots per row", 1);
  requireStripWidth(plotsPerRow);
  const random = mulberry32(seed);
  const all = shuffled(Array.from({ length: replicates }, () => treatments).flat(), random);
  const rows: PlannedPlot[][] = [];
  for (let i = 0; i < all.length; i += plotsPerRow) {
    rows.push(all.slice(i, i + plotsPerRow).map((treatment) => ({ treatment })));
  }
  return {
    design: "completely_randomized",
    seed,
    arrangement,
    plots: numberStrips(rows, plotsPerRow, false, arrangement),
  };
}

export interface RcbdLayoutOptions {
  treatments: readonly string[];
  blocks: number;
  seed: number;
  arrangement?: FieldArrangement;
}

/** Each block receives every unit once, in an order drawn independently per block. */
function randomizeWithinBlocks(units: readonly PlannedPlot[], blocks: number, random: UniformSource): PlannedPlot[][] {
  return Array.from({ length: blocks }, () => shuffled(units, random));
}

/**
 * Randomized complete block design: every treatment once in each block, the order randomized
 * independently within each block (Fisher–Yates with a seeded Mulberry32).
 * Source: Cochran & Cox 1957, ch. 4; Gomez & Gomez 1984, Statistical Procedures for Agricultural Research, §2.2 (from memory).
 */
export function rcbdLayout({ treatments, blocks, seed, arrangement = "straight" }: RcbdLayoutOptions): FieldLayout {
  requireDistinctNonEmpty(treatments, "treatments", 2);
  requireCount(blocks, "blocks", 1);
  requireStripWidth(treatments.length);
  const random = mulberry32(seed);
  const strips = randomizeWithinBlocks(
    treatments.map((treatment) => ({ treatment })),
    blocks,
    random,
  );
  return { design: "rcbd", seed, arrangement, plots: numberStrips(strips, treatments.length, true, arrangement) };
}

export interface FactorialRcbdLayoutOptions {
  factors: readonly Factor[];
  blocks: number;
  seed: number;
  arrangement?: FieldArrangement;
}

/**
 * Factorial treatments in an RCBD: every combination of factor levels is a treatment, each once per
 * block, randomized within blocks. Source: Gomez & Gomez 1984, ch. 3 (from memory).
 */
export function factorialRcbdLayout({
  factors,
  blocks,
  seed,
  arrangement = "straight",
}: FactorialRcbdLayoutOptions): FieldLayout {
  const combos = factorialCombinations(factors);
  requireCount(blocks, "blocks", 1);
  requireStripWidth(combos.length);
  const random = mulberry32(seed);
  const strips = randomizeWithinBlocks(
    combos.map((c) => ({ treatment: c.code, levels: c.levels })),
    blocks,
    random,
  );
  return { design: "factorial_rcbd", seed, arrangement, plots: numberStrips(strips, combos.length, true, arrangement) };
}

export interface SplitPlotLayoutOptions {
  mainFactor: Factor;
  subFactor: Factor;
  blocks: number;
  seed: number;
  arrangement?: FieldArrangement;
}

/**
 * Split-plot in randomized complete blocks: in each block the main-plot factor's levels are
 * randomized over the main plots; within each main plot the sub-plot factor's levels are randomized
 * over its sub-plots. Plots are numbered along the block, sub-plots of a main plot adjacent.
 * Source: Gomez & Gomez 1984, Statistical Procedures for Agricultural Research, ch. 3, split-plot design (from memory).
 */
export function splitPlotLayout({
  mainFactor,
  subFactor,
  blocks,
  seed,
  arrangement = "straight",
}: SplitPlotLayoutOptions): FieldLayout {
  factorialCombinations([mainFactor, subFactor]); // validates names and levels
  requireCount(blocks, "blocks", 1);
  const width = mainFactor.levels.length * subFactor.levels.length;
  requireStripWidth(width);
  const random = mulberry32(seed);
  const strips: PlannedPlot[][] = [];
  for (let b = 0; b < blocks; b++) {
    const mainOrder = shuffled(mainFactor.levels, random);
    strips.push(
      mainOrder.flatMap((mainLevel, m) =>
        shuffled(subFactor.levels, random).map((subLevel) => ({
          treatment: [mainLevel, subLevel].join(LEVEL_SEPARATOR),
          levels: { [mainFactor.name]: mainLevel, [subFactor.name]: subLevel },
          mainPlot: m + 1,
        })),
      ),
    );
  }
  return { design: "split_plot", seed, arrangement, plots: numberStrips(strips, width, true, arrangement) };
}
