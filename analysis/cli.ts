// Command-line analysis of a tidy CSV (one row per plot, and season): prints the ANOVA table,
// means with letters, pairwise comparisons and contrasts, as a table or as one JSON object.
//   analyze --input FILE.csv --response COL [--treatment COL | --factors A,B | --main A --sub B]
//           [--block COL] [--season COL] [--method tukey|lsd] [--alpha 0.05]
//           [--contrast "NAME=c1,c2,..."]... [--format json|table]
import { readFileSync } from "node:fs";
import Papa from "papaparse";
import {
  factorialAnova,
  oneWayAnova,
  rcbdAnova,
  seasonsAnalysis,
  separateMeans,
  separateMeansWithin,
  splitPlotAnova,
  studentizedRangeQuantile,
  tQuantile,
  testContrasts,
  type AnovaResult,
  type ComparisonMethod,
  type ContrastSpec,
  type LeveledPlot,
  type MeanSeparation,
} from "./stats";

export interface CliOptions {
  input: string;
  response: string;
  treatment?: string;
  factors?: string[];
  main?: string;
  sub?: string;
  block?: string;
  season?: string;
  method: ComparisonMethod;
  alpha: number;
  contrasts: ContrastSpec[];
  format: "json" | "table";
}

/** Parses the command line; throws with a one-line reason on anything it cannot use. */
export function parseArguments(argv: readonly string[]): CliOptions {
  const values = new Map<string, string[]>();
  for (let i = 0; i < argv.length; i++) {
    const flag = argv[i];
    if (!flag.startsWith("--")) throw new Error(`unexpected argument "${flag}"`);
    const value = argv[i + 1];
    if (value === undefined || value.startsWith("--")) throw new Error(`${flag} needs a value`);
    values.set(flag.slice(2), [...(values.get(flag.slice(2)) ?? []), value]);
    i += 1;
  }
  const known = ["input", "response", "treatment", "factors", "main", "sub", "block", "season", "method", "alpha", "contrast", "format"];
  for (const key of values.keys()) if (!known.includes(key)) throw new Error(`unknown option --${key}`);
  const one = (key: string) => values.get(key)?.at(-1);
  const input = one("input");
  const response = one("response");
  if (!input) throw new Error("--input FILE.csv is required");
  if (!response) throw new Error("--response COLUMN is required");
  const method = one("method") ?? "tukey";
  if (method !== "tukey" && method !== "lsd") throw new Error(`--method must be tukey or lsd, not "${method}"`);
  const alpha = Number(one("alpha") ?? "0.05");
  if (!(alpha > 0 && alpha < 1)) throw new Error("--alpha must be a number between 0 and 1");
  const format = one("format") ?? "table";
  if (format !== "json" && format !== "table") throw new Error(`--format must be json or table, not "${format}"`);
  const contrasts = (values.get("contrast") ?? []).map((text) => {
    const eq = text.indexOf("=");
    if (eq <= 0) throw new Error(`--contrast "${text}" should look like NAME=c1,c2,...`);
    const coefficients = text.slice(eq + 1).split(",").map((c) => Number(c.trim()));
    if (coefficients.some((c) => !Number.isFinite(c))) throw new Error(`--contrast "${text}" has a coefficient that is not a number`);
    return { name: text.slice(0, eq).trim(), coefficients };
  });
  const options: CliOptions = {
    input,
    response,
    treatment: one("treatment"),
    factors: one("factors")?.split(",").map((f) => f.trim()),
    main: one("main"),
    sub: one("sub"),
    block: one("block"),
    season: one("season"),
    method,
    alpha,
    contrasts,
    format,
  };
  const layouts = [options.treatment, options.factors, options.main ?? options.sub].filter((x) => x !== undefined).length;
  if (layouts !== 1) throw new Error("give exactly one of --treatment COL, --factors A,B or --main A --sub B");
  if ((options.main === undefined) !== (options.sub === undefined)) throw new Error("--main and --sub go together");
  return options;
}

/**
 * Rows of a tidy CSV as plots; an empty response cell is a missing value. `columns` maps the
 * name each factor takes in the analysis to its CSV column (block, treatment and season take
 * those standard names; factorial and split-plot factors keep their column names).
 */
export function plotsFromCsv(text: string, response: string, columns: Readonly<Record<string, string>>): LeveledPlot[] {
  const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: "greedy" });
  const header = parsed.meta.fields ?? [];
  for (const column of [response, ...Object.values(columns)]) {
    if (!header.includes(column)) throw new Error(`the file has no column "${column}" (columns: ${header.join(", ")})`);
  }
  return parsed.data.map((row, i) => {
    const cell = (row[response] ?? "").trim();
    const value = cell === "" ? null : Number(cell);
    if (value !== null && !Number.isFinite(value)) throw new Error(`row ${i + 2}: ${response} "${cell}" is not a number`);
    return { levels: Object.fromEntries(Object.entries(columns).map(([name, c]) => [name, (row[c] ?? "").trim()])), value };
  });
}

function factorColumns(options: CliOptions): Record<string, string> {
  const columns: Record<string, string> = {};
  if (options.block) columns.block = options.block;
  if (options.treatment) columns.treatment = options.treatment;
  if (options.season) columns.season = options.season;
  for (const f of [...(options.factors ?? []), options.main, options.sub]) if (f) columns[f] = f;
  return columns;
}

interface Analysis {
  model: string;
  result: AnovaResult;
  /** The term whose means, comparisons and contrasts are reported. */
  term: string;
  /** Treatment factors (for contrasts across seasons). */
  treatments: string[];
  /** For analyses across seasons: means are separated within each season. */
  season?: string;
}

function analyse(options: CliOptions, plots: LeveledPlot[]): Analysis {
  const block = options.block ? "block" : undefined;
  if (options.main && options.sub) {
    if (!block) throw new Error("a split-plot needs --block");
    const result = splitPlotAnova(plots, { block, main: [options.main], sub: [options.sub] });
    return { model: "split-plot", result, term: `${options.main}:${options.sub}`, treatments: [options.main, options.sub] };
  }
  const treatments = options.factors ?? ["treatment"];
  if (options.season) {
    if (!block) throw new Error("an analysis across seasons needs --block");
    const result = seasonsAnalysis(plots, { block, treatments, season: "season" });
    return { model: "split-plot in time", result, term: [...treatments, "season"].join(":"), treatments, season: "season" };
  }
  if (options.factors) {
    const result = factorialAnova(plots, { factors: options.factors, block });
    const model = block ? "factorial in RCBD" : "factorial (completely randomized)";
    return { model, result, term: options.factors.join(":"), treatments };
  }
  if (block) {
    const rcbdPlots = plots.map((p) => ({ block: p.levels.block, treatment: p.levels.treatment, value: p.value }));
    return { model: "rcbd", result: rcbdAnova(rcbdPlots), term: "treatment", treatments };
  }
  const oneWayPlots = plots.map((p) => ({ treatment: p.levels.treatment, value: p.value }));
  return { model: "one-way", result: oneWayAnova(oneWayPlots), term: "treatment", treatments };
}

function separations(analysis: Analysis, options: CliOptions): MeanSeparation[] {
  const comparison = { method: options.method, alpha: options.alpha };
  if (analysis.season) return Object.values(separateMeansWithin(analysis.result, analysis.term, analysis.season, comparison));
  return [separateMeans(analysis.result, analysis.term, comparison)];
}

/** Tukey's HSD and the LSD, when every pair of means has the same SE and df; otherwise null. */
function criticalDifferences(separation: MeanSeparation): { lsd: number | null; hsd: number | null } {
  if (separation.criticalDifference === null || separation.comparisons.length === 0) return { lsd: null, hsd: null };
  const { se, df } = separation.comparisons[0];
  const alpha = separation.alpha;
  return {
    lsd: tQuantile(1 - alpha / 2, df) * se,
    hsd: (studentizedRangeQuantile(1 - alpha, separation.means.length, df) * se) / Math.SQRT2,
  };
}

/** The JSON report described in issue 5. */
export function report(options: CliOptions, csvText: string): Record<string, unknown> {
  const plots = plotsFromCsv(csvText, options.response, factorColumns(options));
  const analysis = analyse(options, plots);
  const { result } = analysis;
  const seps = separations(analysis, options);
  const contrastTerm = analysis.season ? analysis.treatments.join(":") : analysis.term;
  const contrasts = options.contrasts.length ? testContrasts(result, contrastTerm, options.contrasts, options.alpha) : [];
  const seasonPosition = analysis.season ? result.means[analysis.term].factors.indexOf(analysis.season) : -1;
  const { lsd, hsd } = seps.length === 1 ? criticalDifferences(seps[0]) : { lsd: null, hsd: null };
  return {
    model: analysis.model,
    response: options.response,
    n: result.n,
    missing: result.missing.map((m) => ({ ...m.levels, estimate: m.estimate })),
    anova: result.table,
    means: seps.flatMap((sep) =>
      sep.means.map((m) => {
        const parts = m.label.split(":");
        const treatment = seasonPosition >= 0 ? parts.filter((_, k) => k !== seasonPosition).join(":") : m.label;
        return {
          treatment,
          ...(seasonPosition >= 0 ? { season: parts[seasonPosition] } : {}),
          mean: m.mean,
          se: m.se,
          n: m.n,
          group: m.group,
        };
      }),
    ),
    comparisons: seps.flatMap((sep) => sep.comparisons.map(({ a, b, diff, se, lower, upper, p }) => ({ a, b, diff, se, lower, upper, p }))),
    grandMean: result.grandMean,
    cvPercent: result.cvPercent,
    lsd,
    hsd,
    contrasts: contrasts.map(({ name, estimate, se, t, df, f, p, lower, upper }) => ({ name, estimate, se, t, df, f, p, lower, upper })),
    notes: seps.map((s) => s.note).filter((n): n is string => n !== null),
  };
}

function formatNumber(v: unknown): string {
  if (v === null || v === undefined) return "";
  if (typeof v !== "number") return String(v);
  if (!Number.isFinite(v)) return "";
  if (v !== 0 && Math.abs(v) < 1e-4) return v.toExponential(2);
  return Number.isInteger(v) ? String(v) : v.toFixed(4);
}

function table(rows: Record<string, unknown>[], columns: string[]): string {
  const cells = [columns, ...rows.map((r) => columns.map((c) => formatNumber(r[c])))];
  const widths = columns.map((_, k) => Math.max(...cells.map((row) => row[k].length)));
  return cells.map((row) => row.map((cell, k) => (k === 0 ? cell.padEnd(widths[k]) : cell.padStart(widths[k]))).join("  ")).join("\n");
}

/** A readable text version of the report. */
export function formatReport(out: Record<string, unknown>): string {
  const lines = [
    `${String(out.model)} ANOVA of ${String(out.response)} (n = ${String(out.n)}, missing ${(out.missing as unknown[]).length})`,
    "",
    table(out.anova as Record<string, unknown>[], ["source", "df", "ss", "ms", "f", "p", "errorTerm"]),
    "",
    `grand mean ${formatNumber(out.grandMean)}   CV ${formatNumber(out.cvPercent)} %`,
    "",
    table(out.means as Record<string, unknown>[], Object.keys((out.means as Record<string, unknown>[])[0] ?? {})),
  ];
  const contrasts = out.contrasts as Record<string, unknown>[];
  if (contrasts.length) lines.push("", table(contrasts, ["name", "estimate", "se", "t", "df", "p", "lower", "upper"]));
  for (const note of out.notes as string[]) lines.push("", `note: ${note}`);
  return lines.join("\n");
}

export function main(argv: readonly string[]): number {
  try {
    const options = parseArguments(argv);
    const text = readFileSync(options.input, "utf8");
    const out = report(options, text);
    process.stdout.write(options.format === "json" ? `${JSON.stringify(out)}\n` : `${formatReport(out)}\n`);
    return 0;
  } catch (error) {
    process.stderr.write(`${error instanceof Error ? error.message.split("\n")[0] : String(error)}\n`);
    return 1;
  }
}

if (process.argv[1] && import.meta.url === new URL(`file://${process.argv[1]}`).href) {
  process.exitCode = main(process.argv.slice(2));
}
