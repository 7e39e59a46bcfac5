// Power planning for an RCBD: the minimum detectable difference by number of blocks, and the
// blocks needed for a target difference (analysis/design/power.ts; DESIGN.md "Planning").
import { z } from "zod";
import { blocksNeeded, minimumDetectableDifference, mseFromCv, rcbdErrorDf } from "../../../analysis/design";
import { optionalNumber } from "./inputs";

export const PlanningInput = z
  .object({
    cv: optionalNumber("The CV", { min: 0.1, max: 200, unit: "%" }),
    mean: optionalNumber("The expected mean", { min: 0.000001 }),
    mse: optionalNumber("The pilot MSE", { min: 0.000001 }),
    difference: optionalNumber("The difference worth detecting", { min: 0.000001 }),
    alpha: optionalNumber("α", { min: 0.001, max: 0.2 }),
    power: optionalNumber("Power", { min: 0.5, max: 0.99 }),
  })
  .superRefine((v, ctx) => {
    if (v.mse === null && v.cv === null) ctx.addIssue({ code: "custom", path: ["cv"], message: "Enter an expected CV % (with the mean), or a pilot MSE." });
    if (v.mse === null && v.cv !== null && v.mean === null) ctx.addIssue({ code: "custom", path: ["mean"], message: "A CV needs the expected mean to turn it into an MSE." });
    if (v.difference === null) ctx.addIssue({ code: "custom", path: ["difference"], message: "Enter the smallest difference between two treatment means worth detecting." });
  });
export type PlanningInput = z.output<typeof PlanningInput>;

export const PLANNING_BLOCKS = [3, 4, 5, 6, 7, 8] as const;

export function planTrial(treatments: number, input: PlanningInput) {
  const alpha = input.alpha ?? 0.05;
  const power = input.power ?? 0.8;
  const mse = input.mse ?? mseFromCv(input.cv!, input.mean!);
  const assumptions = { treatments, mse, alpha, power };
  const table = PLANNING_BLOCKS.map((blocks) => ({
    blocks,
    df: rcbdErrorDf(treatments, blocks),
    mdd: minimumDetectableDifference({ ...assumptions, blocks }),
  }));
  const needed = blocksNeeded({ ...assumptions, targetDifference: input.difference!, maxBlocks: 50 });
  return { mse, alpha, power, table, needed, mseSource: input.mse !== null ? "pilot" : "cv" } as const;
}
