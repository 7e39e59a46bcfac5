// Zod pieces for the design forms. Form fields arrive as strings; blank optional numbers become null.
import { z } from "zod";
import { AMENDMENT_MATERIALS, TIMINGS, TRIAL_DESIGNS, TRIAL_STATUSES } from "../db/schema";

type Bounds = { min?: number; max?: number; integer?: boolean; unit?: string };

function numberFrom(label: string, { min, max, integer, unit }: Bounds) {
  const u = unit ? ` ${unit}` : "";
  let n = z.number({ error: `${label} must be a number.` });
  if (integer) n = n.int(`${label} must be a whole number.`);
  if (min !== undefined) n = n.min(min, `${label} must be at least ${min}${u}.`);
  if (max !== undefined) n = n.max(max, `${label} must be at most ${max}${u}.`);
  return n;
}

const toNumber = (v: string) => Number(v.trim().replace(/\u2212/g, "-"));

/** A required number typed in a form field. */
export function requiredNumber(label: string, bounds: Bounds = {}) {
  return z
    .string({ error: `Enter ${label.toLowerCase()}.` })
    .trim()
    .min(1, `Enter ${label.toLowerCase()}.`)
    .transform(toNumber)
    .pipe(numberFrom(label, bounds));
}

/** An optional number: a blank field is null. */
export function optionalNumber(label: string, bounds: Bounds = {}) {
  return z
    .string()
    .optional()
    .transform((v) => (v === undefined || v.trim() === "" ? null : toNumber(v)))
    .pipe(numberFrom(label, bounds).nullable());
}

export function requiredText(label: string, max = 200) {
  return z
    .string({ error: `Enter ${label.toLowerCase()}.` })
    .trim()
    .min(1, `Enter ${label.toLowerCase()}.`)
    .max(max, `Use at most ${max} characters.`);
}

export function optionalText(max = 4000) {
  return z
    .string()
    .optional()
    .transform((v) => (v === undefined || v.trim() === "" ? null : v.trim()))
    .pipe(z.string().max(max, `Use at most ${max} characters.`).nullable());
}

export const checkbox = z
  .string()
  .optional()
  .transform((v) => v === "on" || v === "true" || v === "1");

export const uuidField = (what: string) => z.string({ error: `Choose ${what}.` }).uuid(`Choose ${what}.`);

export const designField = z.enum(TRIAL_DESIGNS, { error: "Choose one of the listed designs." });
export const statusField = z.enum(TRIAL_STATUSES, { error: "Choose one of the listed statuses." });
export const materialField = z.enum(AMENDMENT_MATERIALS, { error: "Choose one of the listed materials." });
export const timingField = z.enum(TIMINGS, { error: "Choose when it is applied." });

/** Fields of the trial form (create and setup). */
export const trialFields = {
  title: requiredText("a title", 200),
  objective: optionalText(4000),
  hypotheses: optionalText(4000),
  siteId: z
    .string()
    .optional()
    .transform((v) => (v ? v : null))
    .pipe(z.string().uuid("Choose one of the listed sites.").nullable()),
  design: designField,
  plotLengthM: requiredNumber("Plot length", { min: 0.5, max: 500, unit: "m" }),
  plotWidthM: requiredNumber("Plot width", { min: 0.5, max: 500, unit: "m" }),
  alleyBetweenPlotsM: requiredNumber("Alley between plots", { min: 0, max: 100, unit: "m" }),
  alleyBetweenBlocksM: requiredNumber("Alley between blocks", { min: 0, max: 100, unit: "m" }),
  blockCount: requiredNumber("Number of blocks", { min: 1, max: 50, integer: true }),
};
export const TrialInput = z.object(trialFields);
export type TrialInput = z.output<typeof TrialInput>;
