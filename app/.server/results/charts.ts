// Chart data for the results page: plain JSON the browser draws with Observable Plot. Each builder
// takes the page's selection (ResultsQuery) and says in its caption what it shows.
import { asc, eq } from "drizzle-orm";
import { mean, quantileSorted, sampleStandardDeviation } from "simple-statistics";
import { defaultSeason, type PlotObservation } from "../../../analysis/results";
import { normalQqPoints, residualDiagnostics } from "../../../analysis/stats";
import { db, schema } from "../db";
import { contrastsView } from "./contrasts";
import { depthLabel, plotObservations } from "./observations";
import type { ResultsQuery } from "./service";
import { cachedForDataVersion, ResultsError, selectObservations, trialData, trialFit } from "./service";

export type SeasonMeansChart = {
  title: string;
  yLabel: string;
  caption: string;
  treatments: { code: string; name: string }[];
  points: { season: string; seasonOrder: number; code: string; name: string; mean: number; se: number | null; n: number }[];
};

function describe(values: number[]) {
  const m = mean(values);
  const se = values.length > 1 ? sampleStandardDeviation(values) / Math.sqrt(values.length) : null;
  return { mean: m, se };
}

function groupBy<T>(items: readonly T[], key: (t: T) => string): Map<string, T[]> {
  const map = new Map<string, T[]>();
  for (const item of items) map.set(key(item), [...(map.get(key(item)) ?? []), item]);
  return map;
}

/** Treatment means ± SE of the plot values in every season (descriptive; one line per treatment). */
async function buildSeasonMeansChart(trialId: string, query: ResultsQuery): Promise<SeasonMeansChart> {
  const data = await trialData(trialId);
  const { selection, observations } = await selectObservations(data, { ...query, season: undefined });
  const names = new Map(data.treatments.map((t) => [t.code, t.name]));
  const points = [...groupBy(observations.filter((o) => o.value !== null), (o) => `${o.seasonOrder}|${o.treatment}`).values()].map(
    (group: PlotObservation[]) => {
      const first = group[0];
      return {
        season: first.season,
        seasonOrder: first.seasonOrder,
        code: first.treatment,
        name: names.get(first.treatment) ?? first.treatment,
        ...describe(group.map((o) => o.value as number)),
        n: group.length,
      };
    },
  );
  const { variable, depth } = selection;
  return {
    title: `${variable.label}, ${depth.label}, by season`,
    yLabel: `${variable.label} (${variable.unit})`,
    caption:
      `Mean of the plot values of each treatment in each season, with bars of ± 1 standard error of the mean ` +
      `(n = plots with a value). Lines join a treatment's seasons; the first season is the baseline when one was sampled.`,
    treatments: data.treatments.map((t) => ({ code: t.code, name: t.name })),
    points: points.sort((a, b) => a.seasonOrder - b.seasonOrder),
  };
}

type Data = Awaited<ReturnType<typeof trialData>>;
type Treatment = { code: string; name: string };

const treatmentsOf = (data: Data): Treatment[] => data.treatments.map((t) => ({ code: t.code, name: t.name }));

/** The season a one-season chart shows: the one selected, else the one the analysis shows by default. */
function chartSeason(query: ResultsQuery, observations: readonly PlotObservation[]): string {
  const season = query.season ?? defaultSeason(observations)?.season;
  if (!season) throw new ResultsError("No samples have been measured in this trial yet.");
  return season;
}

/** Said when the selected analysis spans seasons but a chart can only show one. */
function seasonNote(query: ResultsQuery, season: string): string {
  if (query.model === "per_season" || query.model === "change_from_baseline") return "";
  return ` The analysis selected spans seasons, so this chart shows the latest season, ${season}; choose “One season” to pick another.`;
}

export type PlotValuesChart = {
  title: string;
  yLabel: string;
  caption: string;
  treatments: Treatment[];
  blocks: number[];
  points: { plotNumber: number; block: number | null; code: string; value: number }[];
  means: { code: string; mean: number }[];
};

/**
 * Every plot's value in one season by treatment, each block its own position and colour, with the
 * least-squares treatment mean of the per-season ANOVA (the means table's numbers) as a line.
 */
async function buildPlotValuesChart(trialId: string, query: ResultsQuery): Promise<PlotValuesChart> {
  const data = await trialData(trialId);
  const { selection, observations } = await selectObservations(data, query);
  const season = chartSeason(query, observations);
  const inSeason = observations.filter((o) => o.season === season);
  if (inSeason.length === 0) throw new ResultsError(`There are no values in season “${season}”.`);
  const points = inSeason.filter((o) => o.value !== null).map((o) => ({ plotNumber: o.plotNumber, block: o.block, code: o.treatment, value: o.value as number }));
  const absent = inSeason.filter((o) => o.value === null);
  let means: PlotValuesChart["means"];
  let meanWords: string;
  try {
    const { fitted } = await trialFit(trialId, { ...query, model: "per_season", season });
    means = fitted.payload.means.map((m) => ({ code: m.code, mean: m.mean }));
    meanWords = "the horizontal line is the treatment's least-squares mean from the per-season ANOVA (as in the means table for this season)";
  } catch (error) {
    if (!(error instanceof ResultsError)) throw error;
    means = [...groupBy(points, (p) => p.code)].map(([code, list]) => ({ code, mean: mean(list.map((p) => p.value)) }));
    meanWords = `the horizontal line is the arithmetic mean of the plots shown (no ANOVA for this season: ${error.message})`;
  }
  const { variable, depth } = selection;
  const blocks = [...new Set(inSeason.map((o) => o.block).filter((b): b is number => b !== null))].sort((a, b) => a - b);
  return {
    title: `${variable.label}, ${depth.label}, ${season}: plot values`,
    yLabel: `${variable.label} (${variable.unit})`,
    caption:
      `Each dot is one plot's value in ${season}, placed and coloured by its block (block number on the axis under each treatment); ` +
      `${meanWords}.` +
      (absent.length > 0 ? ` Not shown: ${absent.map((o) => `plot ${o.plotNumber} (${o.treatment}, ${o.excluded ? "excluded in QC" : "missing"})`).join("; ")}.` : "") +
      seasonNote(query, season),
    treatments: treatmentsOf(data),
    blocks,
    points,
    means,
  };
}

export type PlotMapChart = {
  title: string;
  caption: string;
  mode: "values" | "residuals";
  legendLabel: string;
  rows: number;
  columns: number;
  cells: { plotNumber: number; block: number; code: string; row: number; column: number; value: number | null; flagged: boolean }[];
};

/**
 * The field as laid out (field row × column) coloured by each plot's value or by its residual from the
 * per-season ANOVA. Residuals remove treatment and block effects, so a colour trend across the field
 * left in them points to a gradient the blocks did not capture.
 */
export async function plotMapChart(trialId: string, query: ResultsQuery, mode: "values" | "residuals"): Promise<PlotMapChart> {
  const data = await trialData(trialId);
  const { selection, observations } = await selectObservations(data, query);
  const season = chartSeason(query, observations);
  const layout = await db
    .select({ plotNumber: schema.plots.plotNumber, row: schema.plots.fieldRow, column: schema.plots.fieldColumn, block: schema.blocks.number, code: schema.treatments.code })
    .from(schema.plots)
    .innerJoin(schema.blocks, eq(schema.blocks.id, schema.plots.blockId))
    .innerJoin(schema.treatments, eq(schema.treatments.id, schema.plots.treatmentId))
    .where(eq(schema.plots.trialId, trialId))
    .orderBy(asc(schema.plots.plotNumber));
  if (layout.length === 0) throw new ResultsError("This trial has no plot layout yet.");
  const values = new Map<number, number | null>();
  const flagged = new Set<number>();
  let note = "";
  if (mode === "values") {
    for (const o of observations) if (o.season === season) values.set(o.plotNumber, o.value);
  } else {
    const { fitted } = await trialFit(trialId, { ...query, model: "per_season", season });
    for (const r of residualDiagnostics(fitted.anova).rows) {
      const plot = fitted.analysed[r.index].plotNumber;
      values.set(plot, r.residual);
      if (r.flagged) flagged.add(plot);
    }
    if (flagged.size > 0) note = ` Outlined: plot${flagged.size === 1 ? "" : "s"} ${[...flagged].join(", ")} with a studentized residual beyond ±3.`;
  }
  const { variable, depth } = selection;
  const unit = variable.unit;
  const absent = layout.filter((p) => values.get(p.plotNumber) == null).map((p) => p.plotNumber);
  return {
    title: mode === "values" ? `${variable.label}, ${depth.label}, ${season}: plot map` : `Residuals of ${variable.label}, ${depth.label}, ${season}: plot map`,
    caption:
      (mode === "values"
        ? `The field as laid out, each plot coloured by its value (darker is higher). `
        : `The field as laid out, each plot coloured by its residual from the per-season ANOVA (observed − fitted, ${unit}): ` +
          `orange above and blue below what treatment and block predict. Patches of one colour across neighbouring plots suggest a field gradient. `) +
      `Each cell gives the plot number and the treatment code.` +
      (absent.length > 0 ? ` Grey, no value: plot${absent.length === 1 ? "" : "s"} ${absent.join(", ")}.` : "") +
      note +
      seasonNote(query, season),
    mode,
    legendLabel: mode === "values" ? `${variable.label} (${unit})` : `Residual (${unit})`,
    rows: Math.max(...layout.map((p) => p.row)) + 1,
    columns: Math.max(...layout.map((p) => p.column)) + 1,
    cells: layout.map((p) => ({ ...p, value: values.get(p.plotNumber) ?? null, flagged: flagged.has(p.plotNumber) })),
  };
}

export type DepthProfileChart = {
  title: string;
  xLabel: string;
  caption: string;
  treatments: Treatment[];
  /** The untreated check, drawn in every panel for reference; null when none is marked. */
  checkCode: string | null;
  points: { code: string; topCm: number; bottomCm: number; midCm: number; mean: number; se: number | null; n: number }[];
};

/** Treatment means ± SE of each depth increment in one season, drawn down the profile. */
async function buildDepthProfileChart(trialId: string, query: ResultsQuery): Promise<DepthProfileChart> {
  const data = await trialData(trialId);
  const variable = data.variables.find((v) => v.id === query.variable);
  if (!variable) throw new ResultsError(`No values of “${query.variable}” in this trial.`);
  if (variable.id === "soc_stock_esm") {
    throw new ResultsError(
      "Equivalent-soil-mass stocks are cumulative from the surface, so they have no per-increment profile; choose SOC stock (fixed depth) for stocks by increment.",
    );
  }
  if (query.season && !data.seasons.some((s) => s.label === query.season)) throw new ResultsError(`This trial has no season “${query.season}”.`);
  const byDepth = data.depths.increments.map((d) => ({ d, observations: plotObservations(data.samples, variable.id, { ...d, cumulative: false }, null) }));
  const season = chartSeason(query, byDepth.flatMap((x) => x.observations));
  const points = byDepth.flatMap(({ d, observations }) => {
    const inSeason = observations.filter((o) => o.season === season && o.value !== null);
    return [...groupBy(inSeason, (o) => o.treatment)].map(([code, list]) => ({
      code,
      topCm: d.topCm,
      bottomCm: d.bottomCm,
      midCm: (d.topCm + d.bottomCm) / 2,
      ...describe(list.map((o) => o.value as number)),
      n: list.length,
    }));
  });
  if (points.length === 0) throw new ResultsError(`There are no values of ${variable.label} in ${season}.`);
  const increments = data.depths.increments.map((d) => `${d.topCm}–${d.bottomCm}`).join(", ");
  const check = data.treatments.find((t) => t.isCheck);
  return {
    title: `${variable.label} down the profile, ${season}`,
    xLabel: `${variable.label} (${variable.unit})`,
    caption:
      `One panel per treatment: the mean of its plot values in each depth increment (${increments} cm), drawn at the middle of the increment ` +
      `with bars of ± 1 standard error; depth increases downwards.` +
      (check ? ` The dashed grey line in every panel is the untreated check (${check.code}).` : "") +
      seasonNote(query, season),
    treatments: treatmentsOf(data),
    checkCode: check?.code ?? null,
    points: points.sort((a, b) => a.midCm - b.midCm),
  };
}

export type StocksChart = {
  title: string;
  xLabel: string;
  caption: string;
  treatments: Treatment[];
  points: { code: string; basis: "Fixed depth" | "Equivalent soil mass"; mean: number; se: number | null; n: number }[];
};

/**
 * SOC stocks by treatment in one season, computed to a fixed depth and on an equivalent soil mass
 * basis (Ellert & Bettany 1995), side by side: where they differ, bulk density changed the soil mass
 * in the fixed layer.
 */
async function buildStocksChart(trialId: string, query: ResultsQuery): Promise<StocksChart> {
  const data = await trialData(trialId);
  // The chart always shows SOC stocks, but a selection that names no variable of this trial is still wrong.
  if (!data.variables.some((v) => v.id === query.variable)) throw new ResultsError(`No values of “${query.variable}” in this trial.`);
  if (!data.variables.some((v) => v.id === "soc_stock")) {
    throw new ResultsError("SOC stocks need both LOI (or SOC) and fine-earth bulk density for the same samples; this trial has no stocks yet.");
  }
  const chosen = query.depth ? /^0-(\d+(?:\.\d+)?)$/.exec(query.depth) : null;
  const deepest = data.depths.cumulative.at(-1) ?? data.depths.increments.find((d) => d.topCm === 0);
  if (!deepest) throw new ResultsError("Stocks are compared from the surface down, and this trial has no increment starting at 0 cm.");
  const span = chosen ? `0-${chosen[1]}` : `0-${deepest.bottomCm}`;
  const fixed = await selectObservations(data, { ...query, variable: "soc_stock", depth: span });
  const esm = await selectObservations(data, { ...query, variable: "soc_stock_esm", depth: span });
  const season = chartSeason(query, fixed.observations);
  const summarise = (observations: PlotObservation[], basis: StocksChart["points"][number]["basis"]) =>
    [...groupBy(observations.filter((o) => o.season === season && o.value !== null), (o) => o.treatment)].map(([code, list]) => ({
      code,
      basis,
      ...describe(list.map((o) => o.value as number)),
      n: list.length,
    }));
  const points = [...summarise(fixed.observations, "Fixed depth"), ...summarise(esm.observations, "Equivalent soil mass")];
  if (points.length === 0) throw new ResultsError(`There are no SOC stocks in ${season}.`);
  const mass = esm.selection.referenceMassMgPerHa;
  const spanLabel = depthLabel({ topCm: 0, bottomCm: fixed.selection.depth.bottomCm, cumulative: false });
  const unit = fixed.selection.variable.unit;
  return {
    title: `SOC stock ${spanLabel}, ${season}: fixed depth and equivalent soil mass`,
    xLabel: `SOC stock (${unit})`,
    caption:
      `Mean SOC stock of each treatment with ± 1 standard error, to a fixed ${spanLabel} (filled circles) and on an equivalent soil mass basis ` +
      `(open squares${mass !== null ? `, reference mass ${mass.toFixed(0)} Mg/ha of fine earth` : ""}; Ellert & Bettany 1995). ` +
      `Where an amendment lowered bulk density, the fixed layer holds less soil and the two differ.` +
      seasonNote(query, season),
    treatments: treatmentsOf(data),
    points,
  };
}

const pText = (p: number) => (p < 0.001 ? "p < 0.001" : `p = ${p.toFixed(3)}`);

export type DiagnosticsChart = {
  title: string;
  caption: string;
  unit: string;
  points: { plotNumber: number; code: string; fitted: number; residual: number; studentized: number; flagged: boolean; theoretical: number }[];
  /** Q–Q reference line through the first and third quartiles. */
  qqLine: { slope: number; intercept: number };
  shapiroWilk: { w: number; p: number };
  brownForsythe: { f: number; df1: number; df2: number; p: number };
};

/**
 * Residual checks of the per-season ANOVA (analysis/stats residualDiagnostics): residuals against
 * fitted values and a normal Q–Q plot with a line through the quartiles, Shapiro–Wilk and
 * Brown–Forsythe, studentized residuals beyond ±3 labelled by plot.
 */
async function buildDiagnosticsChart(trialId: string, query: ResultsQuery): Promise<DiagnosticsChart> {
  const data = await trialData(trialId);
  const season = chartSeason(query, (await selectObservations(data, query)).observations);
  const { selection, fitted } = await trialFit(trialId, { ...query, model: "per_season", season });
  const diagnostics = residualDiagnostics(fitted.anova);
  const sorted = [...diagnostics.rows].sort((a, b) => a.residual - b.residual);
  const scores = normalQqPoints(sorted.map((r) => r.residual));
  const theoretical = new Map(sorted.map((r, i) => [r.index, scores[i].theoretical]));
  const quartile = (p: number) => ({
    sample: quantileSorted(scores.map((s) => s.sample), p),
    theoretical: quantileSorted(scores.map((s) => s.theoretical), p),
  });
  const [q1, q3] = [quartile(0.25), quartile(0.75)];
  const slope = (q3.sample - q1.sample) / (q3.theoretical - q1.theoretical);
  const flagged = diagnostics.rows.filter((r) => r.flagged).map((r) => fitted.analysed[r.index].plotNumber);
  const { variable, depth } = selection;
  const sw = diagnostics.shapiroWilk;
  const bf = diagnostics.brownForsythe;
  return {
    title: `Residual checks: ${variable.label}, ${depth.label}, ${season}`,
    caption:
      `Residuals vs fitted: the residuals (observed − fitted, ${variable.unit}) of the per-season ANOVA against the fitted values; a funnel shape means the spread grows with the mean. ` +
      `Normal Q–Q: the residuals against normal scores (Blom); points near the dashed line through the quartiles look normal. ` +
      `Shapiro–Wilk W = ${sw.w.toFixed(3)}, ${pText(sw.p)}; ` +
      `Brown–Forsythe F(${bf.df1}, ${bf.df2}) = ${bf.f.toFixed(2)}, ${pText(bf.p)} (equal spread across treatments). ` +
      (flagged.length > 0
        ? `Labelled: plot${flagged.length === 1 ? "" : "s"} ${flagged.join(", ")} with a studentized residual beyond ±3 — check the lab sheet.`
        : "No studentized residual lies beyond ±3.") +
      seasonNote(query, season),
    unit: variable.unit,
    points: diagnostics.rows.map((r) => ({
      plotNumber: fitted.analysed[r.index].plotNumber,
      code: fitted.analysed[r.index].treatment,
      fitted: r.fitted,
      residual: r.residual,
      studentized: r.studentized,
      flagged: r.flagged,
      theoretical: theoretical.get(r.index)!,
    })),
    qqLine: { slope, intercept: q1.sample - slope * q1.theoretical },
    shapiroWilk: sw,
    brownForsythe: bf,
  };
}

export type ContrastsChart = {
  title: string;
  xLabel: string;
  caption: string;
  level: number;
  estimates: { name: string; estimate: number; lower: number; upper: number; p: number; significant: boolean }[];
  problems: { name: string; error: string }[];
};

/** The saved contrasts' estimates with their confidence intervals in the selected analysis. */
export async function contrastsChart(trialId: string, query: ResultsQuery): Promise<ContrastsChart> {
  const view = await contrastsView(trialId, query);
  if (view.analysisError) throw new ResultsError(view.analysisError);
  const level = Math.round((1 - query.alpha) * 1000) / 10;
  const estimates = view.outcomes.flatMap((o) =>
    o.result ? [{ name: o.name, estimate: o.result.estimate, lower: o.result.lower, upper: o.result.upper, p: o.result.p, significant: o.result.p < query.alpha }] : [],
  );
  return {
    title: view.analysisLabel ? `Contrasts: ${view.analysisLabel}` : "Contrasts",
    xLabel: `Estimate (${view.unit ?? "units of the variable"})`,
    caption:
      view.contrasts.length === 0
        ? "No contrasts are saved for this trial yet. A researcher adds them on the contrasts page (presets: each treatment vs the check, polynomial trends for rates)."
        : `Each saved contrast's estimate (Σ coefficient × treatment mean) with its ${level} % confidence interval; ` +
          `an interval that misses the dashed zero line is significant at α = ${query.alpha} (filled dots; open dots are not).`,
    level,
    estimates,
    problems: view.outcomes.flatMap((o) => (o.error ? [{ name: o.name, error: o.error }] : [])),
  };
}

// The charts that depend only on measured data, kept until the data change (the plot map also reads
// the layout and the contrasts chart the saved contrasts, so those two are computed every time).
export const seasonMeansChart = (trialId: string, query: ResultsQuery): Promise<SeasonMeansChart> =>
  cachedForDataVersion(trialId, `chart:season-means|${JSON.stringify(query)}`, () => buildSeasonMeansChart(trialId, query));
export const plotValuesChart = (trialId: string, query: ResultsQuery): Promise<PlotValuesChart> =>
  cachedForDataVersion(trialId, `chart:plot-values|${JSON.stringify(query)}`, () => buildPlotValuesChart(trialId, query));
export const depthProfileChart = (trialId: string, query: ResultsQuery): Promise<DepthProfileChart> =>
  cachedForDataVersion(trialId, `chart:depth-profile|${JSON.stringify(query)}`, () => buildDepthProfileChart(trialId, query));
export const stocksChart = (trialId: string, query: ResultsQuery): Promise<StocksChart> =>
  cachedForDataVersion(trialId, `chart:stocks|${JSON.stringify(query)}`, () => buildStocksChart(trialId, query));
export const diagnosticsChart = (trialId: string, query: ResultsQuery): Promise<DiagnosticsChart> =>
  cachedForDataVersion(trialId, `chart:diagnostics|${JSON.stringify(query)}`, () => buildDiagnosticsChart(trialId, query));
