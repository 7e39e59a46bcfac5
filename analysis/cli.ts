// Command-line analysis of a tidy CSV (one row per plot, and season): prints the ANOVA table,
// means with letters, pairwise comparisons and contrasts, as a table or as one JSON object.
// `npm run --silent analyze -- …` runs it compiled from build/cli/ (scripts/analyze.mjs).
import { readFileSync } from "node:fs";
import { pathToFileURL } from "node:url";
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
import { saveStudentizedRangeNodes, useStudentizedRangeNodeStore } from "./stats/studentized-range-table";
import { studentizedRangeFileStore } from "./studentized-range-files";

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

export const USAGE = `usage: npm run --silent analyze -- --input FILE.csv --response COL
         [--treatment COL | --factors A,B | --main A --sub B] [--block COL] [--season COL]
         [--method tukey|lsd] [--alpha 0.05] [--contrast "NAME=c1,c2,..."]... [--format json|table]
One row per plot (and season); an empty response cell is a missing value. Without --block the
design is completely randomized; with --season the seasons are analysed as a split-plot in time.`;

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
  if (options.factors && (options.factors.length < 2 || options.factors.some((f) => f === ""))) {
    throw new Error(`--factors takes two or three column names separated by commas, e.g. --factors amendment,rate`);
  }
  if (options.main && options.season) {
    throw new Error("--season cannot be combined with --main/--sub; analyse a split-plot one season at a time");
  }
  return options;
}

/**
 * Rows of a tidy CSV as plots; an empty response cell is a missing value. `columns` maps the
 * name each factor takes in the analysis to its CSV column (block, treatment and season take
 * those standard names; factorial and split-plot factors keep their column names).
 */
export function plotsFromCsv(text: string, response: string, columns: Readonly<Record<string, string>>): LeveledPlot[] {
  // A spreadsheet's byte-order mark would otherwise stick to the first column's name.
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const rows = Papa.parse<string[]>(body, { header: false, skipEmptyLines: "greedy" }).data;
  const header = (rows[0] ?? []).map((name) => name.trim());
  const columnIndex = (column: string) => {
    const index = header.indexOf(column);
    if (index < 0) throw new Error(`the file has no column "${column}" (columns: ${header.join(", ")})`);
    return index;
  };
  const responseIndex = columnIndex(response);
  const factorIndex = Object.entries(columns).map(([name, column]) => [name, columnIndex(column)] as const);
  return rows.slice(1).map((row, i) => {
    const cell = (row[responseIndex] ?? "").trim();
    const value = cell === "" ? null : Number(cell);
    if (value !== null && !Number.isFinite(value)) throw new Error(`row ${i + 2}: ${response} "${cell}" is not a number`);
    const levels: Record<string, string> = {};
    for (const [name, index] of factorIndex) levels[name] = (row[index] ?? "").trim();
    return { levels, value };
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
  /** Notes the report carries (assumptions, corrections). */
  notes: string[];
}

function analyse(options: CliOptions, plots: LeveledPlot[]): Analysis {
  const block = options.block ? "block" : undefined;
  if (options.main && options.sub) {
    if (!block) throw new Error("a split-plot needs --block (the replicate of each main plot)");
    const result = splitPlotAnova(plots, { block, main: [options.main], sub: [options.sub] });
    return { model: "split-plot", result, term: `${options.main}:${options.sub}`, treatments: [options.main, options.sub], notes: [] };
  }
  const treatments = options.factors ?? ["treatment"];
  if (options.season) {
    if (!block) throw new Error("an analysis across seasons needs --block: without it the rows cannot be followed as the same plot from season to season");
    const result = seasonsAnalysis(plots, { block, treatments, season: "season" });
    const { epsilon, adjusted, assumption } = result.sphericity;
    const corrected = adjusted.map((a) => `${a.source} p = ${a.p.toPrecision(3)}`).join(", ");
    const notes = [`Greenhouse–Geisser ε = ${epsilon.toFixed(3)}; corrected ${corrected} (${assumption})`];
    return { model: "split-plot in time", result, term: [...treatments, "season"].join(":"), treatments, season: "season", notes };
  }
  if (options.factors) {
    const result = factorialAnova(plots, { factors: options.factors, block });
    const model = block ? "factorial in RCBD" : "factorial (completely randomized)";
    return { model, result, term: options.factors.join(":"), treatments, notes: [] };
  }
  if (block) {
    const rcbdPlots = plots.map((p) => ({ block: p.levels.block, treatment: p.levels.treatment, value: p.value }));
    return { model: "rcbd", result: rcbdAnova(rcbdPlots), term: "treatment", treatments, notes: [] };
  }
  const oneWayPlots = plots.map((p) => ({ treatment: p.levels.treatment, value: p.value }));
  return { model: "one-way", result: oneWayAnova(oneWayPlots), term: "treatment", treatments, notes: [] };
}

function separations(analysis: Analysis, options: CliOptions): MeanSeparation[] {
  const comparison = { method: options.method, alpha: options.alpha };
  const set = analysis.result.means[analysis.term];
  if (set.unavailableReason) {
    // The ANOVA table still stands; means are listed without SEs, comparisons or letters.
    const means = set.labels.map((label, i) => ({ label, mean: set.means[i], se: set.se[i], n: set.n[i], group: "" }));
    return [{ term: set.term, method: options.method, alpha: options.alpha, means, comparisons: [], criticalDifference: null, protectedByF: null, note: set.unavailableReason }];
  }
  if (analysis.season) return Object.values(separateMeansWithin(analysis.result, analysis.term, analysis.season, comparison));
  return [separateMeans(analysis.result, analysis.term, comparison)];
}

/**
 * LSD = t_{1−α/2,ν}·SE and Tukey's HSD = q_{1−α}(k, ν)·SE/√2 (SE of a difference), when every
 * pair of means in every family has the same SE and df — balanced data; otherwise null.
 */
function criticalDifferences(separations: readonly MeanSeparation[]): { lsd: number | null; hsd: number | null } {
  const first = separations[0]?.comparisons[0];
  const same = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.abs(b);
  const uniform =
    first !== undefined &&
    separations.every(
      (s) => s.criticalDifference !== null && s.means.length === separations[0].means.length && same(s.comparisons[0].se, first.se) && same(s.comparisons[0].df, first.df),
    );
  if (!uniform) return { lsd: null, hsd: null };
  const { se, df } = first;
  const alpha = separations[0].alpha;
  return {
    lsd: tQuantile(1 - alpha / 2, df) * se,
    hsd: (studentizedRangeQuantile(1 - alpha, separations[0].means.length, df) * se) / Math.SQRT2,
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
  const { lsd, hsd } = criticalDifferences(seps);
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
    notes: [...analysis.notes, ...new Set(seps.map((s) => s.note).filter((n): n is string => n !== null))],
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
    `grand mean ${formatNumber(out.grandMean)}   CV ${formatNumber(out.cvPercent)} %` +
      (out.lsd !== null ? `   LSD ${formatNumber(out.lsd)}   Tukey HSD ${formatNumber(out.hsd)}` : ""),
    "",
    table(out.means as Record<string, unknown>[], Object.keys((out.means as Record<string, unknown>[])[0] ?? {})),
  ];
  const contrasts = out.contrasts as Record<string, unknown>[];
  if (contrasts.length) lines.push("", table(contrasts, ["name", "estimate", "se", "t", "df", "p", "lower", "upper"]));
  for (const note of out.notes as string[]) lines.push("", `note: ${note}`);
  return lines.join("\n");
}

/** Where the tool writes; tests pass their own to capture the output. */
export interface CliOutput {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
}

const processOutput: CliOutput = {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
};

/** Files the tool may keep between runs; scripts/analyze.mjs puts them under build/cli. */
export interface CliCaches {
  /** Folder of jstat's studentized-range node values (see analysis/studentized-range-files.ts). */
  studentizedRangeNodes?: string;
}

/** Runs the tool; returns the exit code: 0, or 1 after printing a one-line reason to stderr. */
export function main(argv: readonly string[], output: CliOutput = processOutput, caches: CliCaches = {}): number {
  if (argv.includes("--help") || argv.includes("-h")) {
    output.stdout(`${USAGE}\n`);
    return 0;
  }
  if (caches.studentizedRangeNodes) useStudentizedRangeNodeStore(studentizedRangeFileStore(caches.studentizedRangeNodes));
  try {
    const options = parseArguments(argv);
    let text: string;
    try {
      text = readFileSync(options.input, "utf8");
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code;
      throw new Error(`cannot read ${options.input}: ${code === "ENOENT" ? "no such file" : code ?? String(error)}`);
    }
    const out = report(options, text);
    output.stdout(options.format === "json" ? `${JSON.stringify(out)}\n` : `${formatReport(out)}\n`);
    return 0;
  } catch (error) {
    output.stderr(`${error instanceof Error ? error.message.split("\n")[0] : String(error)}\n`);
    return 1;
  } finally {
    if (caches.studentizedRangeNodes) {
      saveStudentizedRangeNodes();
      useStudentizedRangeNodeStore(null);
    }
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  process.exitCode = main(process.argv.slice(2));
}
