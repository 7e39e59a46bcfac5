// Chart routes, contrasts and result exports: the same numbers as the library on the same plots,
// the right refusals, and messages for bad input.
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db, schema } from "~/.server/db";
import { loadDerivedSamples, type DerivedSample } from "~/.server/intake/derived";
import { plotObservations } from "~/.server/results/observations";
import { seedDemo } from "~/.server/seed";
import * as contrastsChartRoute from "~/routes/api.trial-chart-contrasts";
import * as depthRoute from "~/routes/api.trial-chart-depth-profile";
import * as diagnosticsRoute from "~/routes/api.trial-chart-diagnostics";
import * as plotMapRoute from "~/routes/api.trial-chart-plot-map";
import * as plotValuesRoute from "~/routes/api.trial-chart-plot-values";
import * as seasonMeansRoute from "~/routes/api.trial-chart-season-means";
import * as stocksRoute from "~/routes/api.trial-chart-stocks";
import * as exportRoute from "~/routes/export.results-csv";
import * as contrastsPage from "~/routes/trial.results.contrasts";
import { rcbdAnova, residualDiagnostics, testContrast } from "../../analysis/stats";
import { DEMO_PASSWORD } from "../../datasets/demo/scenario";
import { cookieFor, formPost, outcome, requestAs } from "../support/sessions";

let trialId: string;
let samples: DerivedSample[];
let lastSeason: string;
const cookies: Record<string, string> = {};

beforeAll(async () => {
  ({ trialId } = await seedDemo());
  for (const role of ["researcher", "collaborator", "extension"]) cookies[role] = await cookieFor(`${role}@cedarhollow.example`, DEMO_PASSWORD);
  samples = await loadDerivedSamples(trialId, { measuredOnly: true });
  lastSeason = [...samples].sort((a, b) => a.seasonOrdinal - b.seasonOrdinal).at(-1)!.season;
}, 120_000);

type Loader = (args: never) => Promise<unknown>;
const get = (route: { loader: Loader }, cookie: string | null, path: string) =>
  outcome(() => route.loader({ request: requestAs(cookie, path), params: { trialId }, context: {} } as never));

const charts = {
  "season-means": seasonMeansRoute,
  "plot-values": plotValuesRoute,
  "plot-map": plotMapRoute,
  "depth-profile": depthRoute,
  stocks: stocksRoute,
  diagnostics: diagnosticsRoute,
  contrasts: contrastsChartRoute,
} as const;

/** The per-season RCBD straight from the library, on the plots the routes read. */
function libraryAnova(variable: string, season: string) {
  const plots = plotObservations(samples, variable, { topCm: 0, bottomCm: 10, cumulative: false }, null).filter((o) => o.season === season);
  return { plots, anova: rcbdAnova(plots.map((p) => ({ block: String(p.block), treatment: p.treatment, value: p.value }))) };
}

describe("chart routes", () => {
  it.each(Object.entries(charts))("%s: collaborator 200 with a title and caption, extension 403, signed out 401", async (name, route) => {
    const path = `/api/trials/${trialId}/charts/${name}?variable=som&depth=0-10`;
    const ok = await get(route, cookies.collaborator, path);
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ title: expect.any(String), caption: expect.any(String) });
    expect((await get(route, cookies.extension, path)).status).toBe(403);
    expect((await get(route, null, path)).status).toBe(401);
  });

  it.each(Object.entries(charts))("%s: an unknown variable is a 400 with a message", async (name, route) => {
    const result = await get(route, cookies.collaborator, `/api/trials/${trialId}/charts/${name}?variable=earthworms`);
    expect(result.status).toBe(400);
    expect((result.body as { error: string }).error).toMatch(/earthworms/);
  });

  it("plot values: every plot of the season, and the least-squares means of the library's RCBD", async () => {
    const result = await get(plotValuesRoute, cookies.collaborator, `/api/trials/${trialId}/charts/plot-values?variable=som&depth=0-10`);
    const body = result.body as { points: { plotNumber: number; value: number }[]; means: { code: string; mean: number }[] };
    const { plots, anova } = libraryAnova("som", lastSeason);
    expect(body.points).toHaveLength(plots.filter((p) => p.value !== null).length);
    const set = anova.means.treatment;
    for (const m of body.means) expect(m.mean).toBeCloseTo(set.means[set.labels.indexOf(m.code)], 10);
  });

  it("diagnostics: residuals, fitted values and Shapiro–Wilk equal residualDiagnostics on the library's per-season ANOVA", async () => {
    const { plots, anova } = libraryAnova("som", lastSeason);
    const direct = residualDiagnostics(anova);
    const result = await get(diagnosticsRoute, cookies.collaborator, `/api/trials/${trialId}/charts/diagnostics?variable=som&depth=0-10&season=${encodeURIComponent(lastSeason)}`);
    const body = result.body as { points: { plotNumber: number; residual: number; fitted: number }[]; shapiroWilk: { w: number; p: number } };
    expect(body.points).toHaveLength(direct.rows.length);
    for (const row of direct.rows) {
      const point = body.points.find((p) => p.plotNumber === plots[row.index].plotNumber)!;
      expect(point.residual).toBeCloseTo(row.residual, 10);
      expect(point.fitted).toBeCloseTo(row.fitted, 10);
    }
    expect(body.shapiroWilk.w).toBeCloseTo(direct.shapiroWilk.w, 12);
  });

  it("diagnostics and the residual plot map flag the demo's outlier", async () => {
    // datasets/demo: one outlying plot value. Find the season whose ANOVA flags it, from the library.
    const seasons = [...new Set(samples.map((s) => s.season))];
    const flaggedIn = seasons.flatMap((season) => {
      const { plots, anova } = libraryAnova("som", season);
      return residualDiagnostics(anova).rows.filter((r) => r.flagged).map((r) => ({ season, plot: plots[r.index].plotNumber }));
    });
    expect(flaggedIn.length).toBeGreaterThan(0);
    const { season, plot } = flaggedIn[0];
    const q = `variable=som&depth=0-10&season=${encodeURIComponent(season)}`;
    const map = await get(plotMapRoute, cookies.collaborator, `/api/trials/${trialId}/charts/plot-map?${q}&show=residuals`);
    const cells = (map.body as { cells: { plotNumber: number; flagged: boolean; row: number; column: number }[] }).cells;
    expect(cells.filter((c) => c.flagged).map((c) => c.plotNumber)).toContain(plot);
    const [layout] = await db.select().from(schema.plots).where(eq(schema.plots.plotNumber, plot));
    expect(cells.find((c) => c.plotNumber === plot)).toMatchObject({ row: layout.fieldRow, column: layout.fieldColumn });
    const diagnostics = await get(diagnosticsRoute, cookies.collaborator, `/api/trials/${trialId}/charts/diagnostics?${q}`);
    expect((diagnostics.body as { caption: string }).caption).toContain(`plot ${plot}`);
  });

  it("plot map: values by field position; an unknown mode is a 400", async () => {
    const result = await get(plotMapRoute, cookies.collaborator, `/api/trials/${trialId}/charts/plot-map?variable=som&depth=0-10`);
    const body = result.body as { cells: { plotNumber: number; value: number | null }[]; rows: number; columns: number };
    const { plots } = libraryAnova("som", lastSeason);
    expect(body.cells).toHaveLength(24); // DESIGN.md demo: 6 treatments × 4 blocks
    for (const p of plots) expect(body.cells.find((c) => c.plotNumber === p.plotNumber)!.value).toBe(p.value);
    const bad = await get(plotMapRoute, cookies.collaborator, `/api/trials/${trialId}/charts/plot-map?variable=som&show=rainbow`);
    expect(bad).toMatchObject({ status: 400, body: { error: "show is values or residuals." } });
  });

  it("depth profile: one mean per treatment and increment, equal to the plots' mean; ESM stocks get a message", async () => {
    const result = await get(depthRoute, cookies.collaborator, `/api/trials/${trialId}/charts/depth-profile?variable=som`);
    const body = result.body as { points: { code: string; topCm: number; mean: number; n: number }[] };
    expect(body.points).toHaveLength(6 * 3); // 6 treatments × 3 increments (DESIGN.md demo)
    const deep = plotObservations(samples, "som", { topCm: 20, bottomCm: 30, cumulative: false }, null).filter(
      (o) => o.season === lastSeason && o.treatment === "T2" && o.value !== null,
    );
    const point = body.points.find((p) => p.code === "T2" && p.topCm === 20)!;
    expect(point.n).toBe(deep.length);
    expect(point.mean).toBeCloseTo(deep.reduce((s, o) => s + (o.value as number), 0) / deep.length, 10);
    const esm = await get(depthRoute, cookies.collaborator, `/api/trials/${trialId}/charts/depth-profile?variable=soc_stock_esm`);
    expect(esm.status).toBe(400);
    expect((esm.body as { error: string }).error).toMatch(/cumulative from the surface/);
  });

  it("stocks: fixed-depth means over 0–30 cm equal the plots' cumulative stocks, ESM beside them", async () => {
    const result = await get(stocksRoute, cookies.collaborator, `/api/trials/${trialId}/charts/stocks?variable=soc_stock`);
    const body = result.body as { points: { code: string; basis: string; mean: number }[]; title: string };
    expect(body.title).toContain("0–30 cm");
    const fixed = plotObservations(samples, "soc_stock", { topCm: 0, bottomCm: 30, cumulative: true }, null).filter(
      (o) => o.season === lastSeason && o.treatment === "T1" && o.value !== null,
    );
    const point = body.points.find((p) => p.code === "T1" && p.basis === "Fixed depth")!;
    expect(point.mean).toBeCloseTo(fixed.reduce((s, o) => s + (o.value as number), 0) / fixed.length, 10);
    expect(body.points.filter((p) => p.basis === "Equivalent soil mass")).toHaveLength(6);
  });
});

describe("a plot without a sample in one season", () => {
  it("is a missing value of that season, estimated by least squares, not a refusal", async () => {
    const { demoMissingPlotSeason, demoSamplingEvents } = await import("../../datasets/demo/measurements");
    const season = demoSamplingEvents[demoMissingPlotSeason.eventIndex].seasonLabel;
    const { trialResults } = await import("~/.server/results/service");
    const view = await trialResults(trialId, { variable: "som", depth: "0-10", model: "per_season", season, method: "tukey", alpha: 0.05 });
    expect(view.results.missing).toHaveLength(1);
    expect(view.results.missing[0].estimate).toEqual(expect.any(Number));
    // RCBD with one missing plot: residual df = (t − 1)(b − 1) − 1 = 5·3 − 1 (Steel & Torrie 1980; DESIGN.md "Missing values").
    expect(view.results.anova.find((r) => r.source === "residual")!.df).toBe(14);
  });
});

const contrastsPath = () => `/trials/${trialId}/results/contrasts?variable=som&depth=0-10`;
const save = (cookie: string, fields: Record<string, string>) =>
  outcome(() => contrastsPage.action({ request: formPost(cookie, contrastsPath(), fields), params: { trialId }, context: {} } as never));

describe("contrasts", () => {
  it("refuses a collaborator's save with 403 and saves nothing", async () => {
    const result = await save(cookies.collaborator, { intent: "save", name: "Sneaky", "c:T2": "1", "c:T1": "-1" });
    expect(result.status).toBe(403);
    expect(await db.select().from(schema.contrasts).where(eq(schema.contrasts.name, "Sneaky"))).toHaveLength(0);
  });

  it("answers 400 with the message beside the coefficients when they do not sum to zero, keeping what was typed", async () => {
    const result = await save(cookies.researcher, { intent: "save", name: "Lopsided", "c:T2": "1", "c:T1": "-0.5" });
    expect(result.status).toBe(400);
    const body = result.body as { errors: Record<string, string[]>; values: Record<string, string> };
    expect(body.errors.coefficients[0]).toBe("The coefficients sum to 0.5; a contrast's coefficients must sum to zero (for example 1 and −1, or 2, −1 and −1).");
    expect(body.values["c:T1"]).toBe("-0.5");
    const text = await save(cookies.researcher, { intent: "save", name: "Typo", "c:T2": "one", "c:T1": "-1" });
    expect((text.body as { errors: Record<string, string[]> }).errors["c:T2"][0]).toMatch(/Write a number/);
  });

  it("saves a contrast and tests it with the library's numbers", async () => {
    const result = await save(cookies.researcher, { intent: "save", name: "Composts vs check", "c:T2": "1", "c:T5": "1", "c:T1": "−2" });
    expect(result.status).toBe(302);
    const [row] = await db.select().from(schema.contrasts).where(eq(schema.contrasts.name, "Composts vs check"));
    expect(row.coefficients).toEqual({ T1: -2, T2: 1, T5: 1 });

    const chart = await get(contrastsChartRoute, cookies.collaborator, `/api/trials/${trialId}/charts/contrasts?variable=som&depth=0-10`);
    const estimate = (chart.body as { estimates: { name: string; estimate: number; lower: number; upper: number; p: number }[] }).estimates.find(
      (e) => e.name === "Composts vs check",
    )!;
    const set = libraryAnova("som", lastSeason).anova.means.treatment;
    const direct = testContrast(set, { name: "x", coefficients: set.labels.map((l) => ({ T1: -2, T2: 1, T5: 1 })[l] ?? 0) });
    expect(estimate.estimate).toBeCloseTo(direct.estimate, 10);
    expect(estimate.lower).toBeCloseTo(direct.lower, 10);
    expect(estimate.p).toBeCloseTo(direct.p, 12);
  });

  it("adds the each-vs-check preset and warns that the set is not orthogonal", async () => {
    const result = await save(cookies.researcher, { intent: "preset", preset: "vs-check" });
    expect(result.status).toBe(302);
    const page = await outcome(() => contrastsPage.loader({ request: requestAs(cookies.collaborator, contrastsPath()), params: { trialId }, context: {} } as never));
    const body = page.body as { canEdit: boolean; view: { contrasts: { name: string }[]; nonOrthogonal: unknown[]; outcomes: { result: unknown }[] } };
    expect(body.canEdit).toBe(false);
    expect(body.view.contrasts.map((c) => c.name)).toEqual(expect.arrayContaining(["T2 vs T1", "T6 vs T1"]));
    expect(body.view.contrasts).toHaveLength(6); // the saved contrast + 5 treatments vs the check
    expect(body.view.nonOrthogonal.length).toBeGreaterThan(0);
    expect(body.view.outcomes.every((o) => o.result !== null)).toBe(true);
  });

  it("deletes a contrast", async () => {
    const [row] = await db.select().from(schema.contrasts).where(eq(schema.contrasts.name, "T6 vs T1"));
    expect((await save(cookies.researcher, { intent: "delete", contrastId: row.id })).status).toBe(302);
    expect(await db.select().from(schema.contrasts).where(eq(schema.contrasts.id, row.id))).toHaveLength(0);
  });
});

describe("result exports", () => {
  const csv = (cookie: string | null, file: string, query = "variable=som&depth=0-10") =>
    outcome(() =>
      exportRoute.loader({ request: requestAs(cookie, `/trials/${trialId}/export/${file}?${query}`), params: { trialId, file }, context: {} } as never),
    );

  it("writes the ANOVA table with numbers as numbers, equal to the library", async () => {
    const result = await csv(cookies.collaborator, "anova.csv");
    expect(result.status).toBe(200);
    const lines = (result.body as string).replace(/^\uFEFF/, "").trim().split("\r\n");
    expect(lines[0]).toBe("variable,unit,depth,model,season,source,df,ss,ms,f,p,error_term");
    const treatment = lines.find((l) => l.split(",")[5] === "treatment")!.split(",");
    const direct = libraryAnova("som", lastSeason).anova.table.find((r) => r.source === "treatment")!;
    expect(Number(treatment[6])).toBe(direct.df);
    expect(Number(treatment[7])).toBeCloseTo(direct.ss, 10);
    expect(treatment[7]).not.toMatch(/["']/);
  });

  it("writes means and comparisons", async () => {
    const means = ((await csv(cookies.collaborator, "means.csv")).body as string).trim().split("\r\n");
    expect(means).toHaveLength(1 + 6);
    const comparisons = ((await csv(cookies.collaborator, "comparisons.csv")).body as string).trim().split("\r\n");
    expect(comparisons).toHaveLength(1 + 15); // 6 treatments: 6·5/2 pairs
  });

  it("refuses extension agents, unknown tables and bad selections", async () => {
    expect((await csv(cookies.extension, "anova.csv")).status).toBe(403);
    expect((await csv(cookies.collaborator, "measurements.csv")).status).toBe(404);
    const bad = await csv(cookies.collaborator, "anova.csv", "variable=earthworms");
    expect(bad.status).toBe(400);
    expect(bad.body).toMatch(/earthworms/);
  });
});
