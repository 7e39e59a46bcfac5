// Published data sets the statistics tests check against. Each names its source; the expected
// values live beside the assertions in the tests.
import type { BlockedPlot, LeveledPlot } from "../../../analysis/stats";

/**
 * Montgomery, Design and Analysis of Experiments, Example 4.1 (vascular graft extrusion):
 * 4 extrusion pressures (treatments, rows) × 6 resin batches (blocks, columns).
 */
export const montgomeryEx41Rows = [
  [90.3, 89.2, 98.2, 93.9, 87.4, 97.9],
  [92.5, 89.5, 90.6, 94.7, 87.0, 95.8],
  [85.5, 90.8, 89.6, 86.2, 88.0, 93.4],
  [82.5, 89.5, 85.6, 87.4, 78.9, 90.7],
];

/** Montgomery & Runger, Applied Statistics and Probability for Engineers, Example 13-5 (fabric strength). */
export const montgomeryRungerEx135Rows = [
  [1.3, 1.6, 0.5, 1.2, 1.1],
  [2.2, 2.4, 0.4, 2.0, 1.8],
  [1.8, 1.7, 0.6, 1.5, 1.3],
  [3.9, 4.4, 2.0, 4.1, 3.4],
];

/** An RCBD from a treatments × blocks table: treatment "T{i+1}", block "{j+1}". */
export function rcbdFromRows(rows: readonly (readonly (number | null)[])[]): BlockedPlot[] {
  return rows.flatMap((row, i) => row.map((value, j) => ({ block: String(j + 1), treatment: `T${i + 1}`, value })));
}

/**
 * Montgomery, DAE, Example 5.1 (battery life): material (1–3) × temperature (15, 70, 125 °F),
 * 4 replicates, completely randomized.
 */
const battery: Record<string, Record<string, number[]>> = {
  "1": { "15": [130, 155, 74, 180], "70": [34, 40, 80, 75], "125": [20, 70, 82, 58] },
  "2": { "15": [150, 188, 159, 126], "70": [136, 122, 106, 115], "125": [25, 70, 58, 45] },
  "3": { "15": [138, 110, 168, 160], "70": [174, 120, 150, 139], "125": [96, 104, 82, 60] },
};
export const montgomeryEx51: LeveledPlot[] = Object.entries(battery).flatMap(([material, byTemp]) =>
  Object.entries(byTemp).flatMap(([temperature, values]) =>
    values.map((value) => ({ levels: { material, temperature }, value })),
  ),
);

/**
 * Montgomery, DAE, split-plot example (paper tensile strength): 3 replicates (blocks) ×
 * 3 pulp preparation methods (main plots) × 4 temperatures 200/225/250/275 °F (sub-plots).
 */
const paper: Record<string, number[][]> = {
  "1": [[30, 35, 37, 36], [34, 41, 38, 42], [29, 26, 33, 36]],
  "2": [[28, 32, 40, 41], [31, 36, 42, 40], [31, 30, 32, 40]],
  "3": [[31, 37, 41, 40], [35, 40, 39, 44], [32, 34, 39, 45]],
};
const temperatures = ["200", "225", "250", "275"];
export const montgomerySplitPlot: LeveledPlot[] = Object.entries(paper).flatMap(([rep, byMethod]) =>
  byMethod.flatMap((values, m) =>
    values.map((value, k) => ({ levels: { rep, method: String(m + 1), temperature: temperatures[k] }, value })),
  ),
);
