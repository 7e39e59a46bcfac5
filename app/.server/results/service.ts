// Results of a trial for one selection (variable, depth, model, season, method, α), computed from
// the derived samples and cached by the trial's data version: new data mean new results.
import { and, asc, eq } from "drizzle-orm";
import { z } from "zod";
import {
  fitResults,
  MODEL_LABELS,
  ResultsError,
  type FittedResults,
  type PlotObservation,
  type ResultsModel,
  type ResultsPayload,
  type TrialDesignId,
} from "../../../analysis/results";
import { UNITS } from "../../../analysis/units";
import { BUILT_IN_VARIABLE_IDS, VARIABLES } from "../../../analysis/variables";
import { db, schema } from "../db";
import { loadDerivedSamples, type DerivedSample } from "../intake/derived";
import { availableDepths, defaultReferenceMass, depthLabel, parseDepth, plotObservations, STOCK_VARIABLES, type DepthChoice } from "./observations";

export { ResultsError };

export const MODELS = Object.keys(MODEL_LABELS) as ResultsModel[];

/** The selection, as it appears in the URL's search params so a view can be shared by link. */
export const ResultsQuery = z.object({
  variable: z.string().regex(/^[a-z][a-z0-9_]{1,39}$/, "Variable ids are lower-case letters, digits and _.").default("som"),
  depth: z.string().max(20).optional(),
  model: z.enum(MODELS as [ResultsModel, ...ResultsModel[]], { error: "Choose one of the listed models." }).default("per_season"),
  season: z.string().max(120).optional(),
  method: z.enum(["tukey", "lsd"], { error: "The comparison method is tukey or lsd." }).default("tukey"),
  alpha: z.coerce.number({ error: "α must be a number." }).min(0.001, "α is at least 0.001.").max(0.2, "α is at most 0.2.").default(0.05),
});
export type ResultsQuery = z.infer<typeof ResultsQuery>;

export function parseResultsQuery(url: URL): { ok: true; query: ResultsQuery } | { ok: false; message: string } {
  const raw = Object.fromEntries([...url.searchParams].filter(([, v]) => v !== ""));
  const parsed = ResultsQuery.safeParse(raw);
  if (parsed.success) return { ok: true, query: parsed.data };
  return { ok: false, message: parsed.error.issues.map((i) => i.message).join(" ") };
}

export type VariableOption = { id: string; label: string; unit: string; decimals: number };

type TrialData = {
  trial: { id: string; title: string; design: TrialDesignId; dataVersion: number; socFactor: number };
  treatments: { code: string; name: string; isCheck: boolean; factorLevels: Record<string, string> | null }[];
  factors: { name: string; stratum: "main" | "sub" | null }[];
  samples: DerivedSample[];
  variables: VariableOption[];
  seasons: { label: string; isBaseline: boolean; order: number }[];
  depths: ReturnType<typeof availableDepths>;
};

const MAX_ENTRIES = 200;
const cache = new Map<string, unknown>();

function remember<T>(key: string, compute: () => T): T {
  if (cache.has(key)) {
    const value = cache.get(key) as T;
    cache.delete(key);
    cache.set(key, value);
    return value;
  }
  const value = compute();
  cache.set(key, value);
  if (cache.size > MAX_ENTRIES) cache.delete(cache.keys().next().value!);
  return value;
}

/**
 * A computation over a trial's data kept until the data change: the key gains the trial's data
 * version, and a failure is not kept.
 */
export async function cachedForDataVersion<T>(trialId: string, key: string, compute: () => Promise<T>): Promise<T> {
  const data = await trialData(trialId);
  const full = `${key}|${trialId}|${data.trial.dataVersion}`;
  return (remember(full, compute) as Promise<T>).catch((error) => {
    cache.delete(full);
    throw error;
  });
}

/** Everything the results pages need about a trial at its current data version. */
export async function trialData(trialId: string): Promise<TrialData> {
  const [trial] = await db
    .select({ id: schema.trials.id, title: schema.trials.title, design: schema.trials.design, dataVersion: schema.trials.dataVersion, socFactor: schema.trials.socFactor, programId: schema.trials.programId })
    .from(schema.trials)
    .where(eq(schema.trials.id, trialId));
  if (!trial) throw new ResultsError("No such trial.");
  const key = `data|${trialId}|${trial.dataVersion}`;
  return (remember(key, () => loadTrialData(trial)) as Promise<TrialData>).catch((error) => {
    cache.delete(key);
    throw error;
  });
}

async function loadTrialData(trial: { id: string; title: string; design: TrialDesignId; dataVersion: number; socFactor: number; programId: string }): Promise<TrialData> {
  const [treatments, factors, samples, custom] = await Promise.all([
    db
      .select({ code: schema.treatments.code, name: schema.treatments.name, isCheck: schema.treatments.isCheck, factorLevels: schema.treatments.factorLevels })
      .from(schema.treatments)
      .where(eq(schema.treatments.trialId, trial.id))
      .orderBy(asc(schema.treatments.position), asc(schema.treatments.code)),
    db
      .select({ name: schema.trialFactors.name, stratum: schema.trialFactors.stratum })
      .from(schema.trialFactors)
      .where(eq(schema.trialFactors.trialId, trial.id))
      .orderBy(asc(schema.trialFactors.position)),
    loadDerivedSamples(trial.id, { measuredOnly: true }),
    db.select().from(schema.customVariables).where(eq(schema.customVariables.programId, trial.programId)),
  ]);
  const has = (id: string) => samples.some((s) => (s as unknown as Record<string, unknown>)[id] != null);
  const variables: VariableOption[] = BUILT_IN_VARIABLE_IDS.filter((id) =>
    id === "soc_stock_esm" ? has("soc_stock") : has(id),
  ).map((id) => ({ id, label: VARIABLES[id].label, unit: UNITS[VARIABLES[id].unit].si, decimals: VARIABLES[id].decimals }));
  for (const c of custom) {
    if (samples.some((s) => s.custom[c.variableId] != null)) {
      variables.push({ id: c.variableId, label: c.label, unit: c.unit, decimals: c.decimals });
    }
  }
  const seasons = [...new Map(samples.map((s) => [s.season, { label: s.season, isBaseline: s.isBaseline, order: s.seasonOrdinal }])).values()].sort(
    (a, b) => a.order - b.order,
  );
  return { trial, treatments, factors, samples, variables, seasons, depths: availableDepths(samples) };
}

/** The depth asked for, checked against what the trial sampled; defaults to the top increment. */
export function resolveDepth(data: TrialData, variable: string, depth: string | undefined): DepthChoice {
  const first = data.depths.increments[0];
  if (!first) throw new ResultsError("No samples have been measured in this trial yet.");
  if (!depth) return variable === "soc_stock_esm" ? { ...(data.depths.cumulative.at(-1) ?? first), cumulative: true } : { ...first, cumulative: false };
  const asked = parseDepth(depth);
  if (!asked) throw new ResultsError(`“${depth}” is not a depth; write it like 0-10 (top and bottom in cm).`);
  const increment = data.depths.increments.find((d) => d.topCm === asked.topCm && d.bottomCm === asked.bottomCm);
  const cumulative = data.depths.cumulative.find((d) => d.topCm === asked.topCm && d.bottomCm === asked.bottomCm);
  if (variable === "soc_stock_esm") {
    if (asked.topCm !== 0) throw new ResultsError("Equivalent-soil-mass stocks run from the surface: choose a depth starting at 0 cm.");
    if (!increment && !cumulative) throw new ResultsError(`This trial has no samples down to ${asked.bottomCm} cm.`);
    return { ...asked, cumulative: true };
  }
  if (increment) return { ...increment, cumulative: false };
  if (cumulative && STOCK_VARIABLES.has(variable)) return { ...cumulative, cumulative: true };
  if (cumulative) throw new ResultsError("Concentrations are analysed per depth increment; cumulative depths are for SOC stocks.");
  const listed = data.depths.increments.map((d) => `${d.topCm}-${d.bottomCm}`).join(", ");
  throw new ResultsError(`This trial has no ${asked.topCm}–${asked.bottomCm} cm increment; it sampled ${listed}.`);
}

/** The ESM reference mass of a span, fixed the first time it is needed and stored with the trial. */
async function referenceMass(data: TrialData, depth: DepthChoice): Promise<number | null> {
  const span = and(
    eq(schema.referenceMasses.trialId, data.trial.id),
    eq(schema.referenceMasses.topCm, 0),
    eq(schema.referenceMasses.bottomCm, depth.bottomCm),
  );
  const [stored] = await db.select().from(schema.referenceMasses).where(span);
  if (stored) return stored.massMgPerHa;
  const mass = defaultReferenceMass(data.samples, depth.bottomCm);
  if (mass === null) return null;
  await db
    .insert(schema.referenceMasses)
    .values({ trialId: data.trial.id, topCm: 0, bottomCm: depth.bottomCm, massMgPerHa: mass })
    .onConflictDoNothing();
  const [fixed] = await db.select().from(schema.referenceMasses).where(span);
  return fixed?.massMgPerHa ?? mass;
}

export type ResultsSelection = {
  variable: VariableOption;
  depth: DepthChoice & { label: string };
  referenceMassMgPerHa: number | null;
  query: ResultsQuery;
};

/** The plot observations of a selection (shared by the analysis, charts and exports). */
export async function selectObservations(data: TrialData, query: ResultsQuery): Promise<{ selection: ResultsSelection; observations: PlotObservation[] }> {
  const variable = data.variables.find((v) => v.id === query.variable);
  if (!variable) {
    const known = data.variables.map((v) => v.id).join(", ") || "none yet";
    throw new ResultsError(`No values of “${query.variable}” in this trial. Variables with data: ${known}.`);
  }
  if (query.season && !data.seasons.some((s) => s.label === query.season)) {
    throw new ResultsError(`This trial has no season “${query.season}”. Seasons: ${data.seasons.map((s) => s.label).join(", ")}.`);
  }
  const depth = resolveDepth(data, variable.id, query.depth);
  const mass = variable.id === "soc_stock_esm" ? await referenceMass(data, depth) : null;
  const observations = plotObservations(data.samples, variable.id, depth, mass);
  return { selection: { variable, depth: { ...depth, label: depthLabel(depth) }, referenceMassMgPerHa: mass, query }, observations };
}

export type ResultsView = { selection: ResultsSelection; results: ResultsPayload; dataVersion: number };
export type FittedView = { selection: ResultsSelection; fitted: FittedResults; dataVersion: number };

/** The analysis of a selection with its fitted model (for contrasts and residual checks), cached by data version. */
export async function trialFit(trialId: string, query: ResultsQuery): Promise<FittedView> {
  const data = await trialData(trialId);
  const key = `results|${trialId}|${data.trial.dataVersion}|${JSON.stringify(query)}`;
  return remember(key, async () => {
    const { selection, observations } = await selectObservations(data, query);
    const fitted = fitResults(observations, {
      design: data.trial.design,
      treatments: data.treatments,
      factors: data.factors,
      model: query.model,
      season: query.season,
      method: query.method,
      alpha: query.alpha,
    });
    return { selection, fitted, dataVersion: data.trial.dataVersion };
  }).catch((error) => {
    cache.delete(key);
    throw error;
  });
}

/** The analysis of a selection, cached by data version. */
export async function trialResults(trialId: string, query: ResultsQuery): Promise<ResultsView> {
  const { selection, fitted, dataVersion } = await trialFit(trialId, query);
  return { selection, results: fitted.payload, dataVersion };
}
