import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { formatReport, main, parseArguments, report } from "../../../analysis/cli";
import { studentizedRangeQuantile } from "../../../analysis/stats";
import { montgomeryEx41Rows, montgomeryEx51, montgomerySplitPlot } from "./published-data";

/** Montgomery, DAE Example 4.1 as a tidy CSV, optionally with one response cell left empty. */
function ex41Csv(blankPressure1Batch3 = false): string {
  const lines = ["batch,pressure,yield"];
  montgomeryEx41Rows.forEach((row, i) =>
    row.forEach((v, j) => lines.push(`${j + 1},P${i + 1},${blankPressure1Batch3 && i === 0 && j === 2 ? "" : v}`)),
  );
  return lines.join("\n");
}

const args = ["--input", "ex41.csv", "--response", "yield", "--treatment", "pressure", "--block", "batch"];

type Row = { source: string; ss: number; df: number; f: number | null };

describe("command-line report", () => {
  it("reproduces Montgomery, DAE Example 4.1 from a CSV", () => {
    const out = report(parseArguments([...args, "--method", "lsd"]), ex41Csv());
    const anova = out.anova as Row[];
    expect(out.model).toBe("rcbd");
    expect(anova.map((r) => r.source)).toEqual(["block", "treatment", "residual", "total"]);
    expect(anova[1].ss).toBeCloseTo(178.171, 3); // Montgomery, DAE Ex 4.1: SS treatment 178.171
    expect(anova[1].f).toBeCloseTo(8.107, 3); // Montgomery, DAE Ex 4.1: F0 = 8.107
    const mse = 109.886 / 15; // Montgomery, DAE Ex 4.1: SS error 109.886 on 15 df
    expect(out.lsd).toBeCloseTo(2.131 * Math.sqrt((2 * mse) / 6), 2); // standard tables: t0.975,15 = 2.131
    expect((out.means as { group: string }[]).map((m) => m.group)).toEqual(["a", "ab", "bc", "c"]);
    expect((out.comparisons as unknown[]).length).toBe(6);
    expect(formatReport(out)).toContain("rcbd ANOVA of yield");
  });

  it("treats an empty response cell as missing (DESIGN.md missing-plot values)", () => {
    const out = report(parseArguments(args), ex41Csv(true));
    const anova = out.anova as Row[];
    expect(anova[1].ss).toBeCloseTo(136.996, 3); // DESIGN.md (Montgomery Ex 4.1 drop 98.2): adjusted SS treatment 136.996
    expect(anova[2].df).toBe(14); // DESIGN.md: SS error on 14 df
    expect((out.missing as { estimate: number }[])[0].estimate).toBeCloseTo(91.513, 3); // DESIGN.md: x = 91.513
    expect(out.hsd).toBeNull(); // unequal SEs once a plot is missing
  });

  it("tests contrasts given on the command line", () => {
    const out = report(parseArguments([...args, "--contrast", "1+2 vs 3+4=1,1,-1,-1"]), ex41Csv());
    const [c] = out.contrasts as { name: string; df: number; estimate: number }[];
    expect(c.name).toBe("1+2 vs 3+4");
    expect(c.df).toBe(15);
    const means = montgomeryEx41Rows.map((r) => r.reduce((s, v) => s + v, 0) / 6);
    expect(c.estimate).toBeCloseTo(means[0] + means[1] - means[2] - means[3], 10);
  });

  it("gives a one-line reason for bad input", () => {
    expect(() => report(parseArguments([...args.slice(0, 6), "--block", "field"]), ex41Csv())).toThrow(
      'the file has no column "field"',
    );
    const oneBlock = ex41Csv().split("\n").filter((l, i) => i === 0 || l.startsWith("1,")).join("\n");
    expect(() => report(parseArguments(args), oneBlock)).toThrow("needs at least 2 levels of block");
    expect(() => report(parseArguments(args), ex41Csv().replace("90.3", "n/a"))).toThrow('row 2: yield "n/a" is not a number');
    const gap = ex41Csv().split("\n").filter((l) => l !== "3,P2,90.6").join("\n");
    expect(() => report(parseArguments(args), gap)).toThrow("block 3 has no plot for treatment P2");
    expect(() => parseArguments(["--input", "x.csv", "--response", "y"])).toThrow("give exactly one of");
    expect(() => parseArguments([...args, "--method", "scheffe"])).toThrow("--method must be tukey or lsd");
  });
});

// ---------------------------------------------------------------------------------------------
// The tool as researchers run it: compiled JavaScript from build/cli/ through scripts/analyze.mjs.

const root = resolve(__dirname, "../../..");
let dir = "";
const file = (name: string, text: string) => {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
};

/** Runs the built tool the way `npm run --silent analyze -- …` does (node scripts/analyze.mjs …). */
function runBuilt(argv: string[]) {
  const out = spawnSync(process.execPath, [join(root, "scripts", "analyze.mjs"), ...argv], { cwd: root, encoding: "utf8" });
  return { status: out.status, stdout: out.stdout, stderr: out.stderr };
}

/** Calls main() with its output captured. */
function runInProcess(argv: string[]) {
  let stdout = "";
  let stderr = "";
  const status = main(argv, { stdout: (t) => (stdout += t), stderr: (t) => (stderr += t) });
  return { status, stdout, stderr };
}

function csv(header: string[], rows: (string | number | null)[][]): string {
  return [header.join(","), ...rows.map((r) => r.map((v) => (v === null ? "" : String(v))).join(","))].join("\n");
}

const ex51Csv = () => csv(["material", "temperature", "life"], montgomeryEx51.map((p) => [p.levels.material, p.levels.temperature, p.value]));
const splitPlotCsv = () =>
  csv(["rep", "method", "temperature", "strength"], montgomerySplitPlot.map((p) => [p.levels.rep, p.levels.method, p.levels.temperature, p.value]));

type AnovaRowOut = { source: string; df: number; ss: number; ms: number | null; f: number | null; p: number | null; errorTerm: string | null };
const rowOf = (out: Record<string, unknown>, source: string) => (out.anova as AnovaRowOut[]).find((r) => r.source === source)!;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "tilthmark-cli-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("built command-line tool (scripts/analyze.mjs → build/cli/analyze.cjs)", () => {
  it("prints the JSON object of issue 5 for Montgomery, DAE Example 4.1", { timeout: 60_000 }, () => {
    const input = file("ex41.csv", ex41Csv());
    const run = runBuilt(["--input", input, "--response", "yield", "--treatment", "pressure", "--block", "batch", "--format", "json"]);
    expect(run.stderr).toBe("");
    expect(run.status).toBe(0);
    const out = JSON.parse(run.stdout) as Record<string, unknown>;
    expect(Object.keys(out)).toEqual([
      "model", "response", "n", "missing", "anova", "means", "comparisons", "grandMean", "cvPercent", "lsd", "hsd", "contrasts", "notes",
    ]);
    expect((out.anova as AnovaRowOut[]).map((r) => r.source)).toEqual(["block", "treatment", "residual", "total"]);
    for (const r of out.anova as AnovaRowOut[]) expect(Object.keys(r)).toEqual(["source", "df", "ss", "ms", "f", "p", "errorTerm"]);
    expect(rowOf(out, "block").ss).toBeCloseTo(192.252, 3); // Montgomery, DAE Ex 4.1: SS block 192.252
    expect(rowOf(out, "treatment").ss).toBeCloseTo(178.171, 3); // Montgomery, DAE Ex 4.1: SS treatment 178.171
    expect(rowOf(out, "residual").ss).toBeCloseTo(109.886, 3); // Montgomery, DAE Ex 4.1: SS error 109.886
    expect(rowOf(out, "treatment").f).toBeCloseTo(8.107, 3); // Montgomery, DAE Ex 4.1: F = 8.107
    expect(rowOf(out, "treatment").p).toBeCloseTo(0.00192, 5); // Montgomery, DAE Ex 4.1: p = 0.00192
    expect(rowOf(out, "treatment").errorTerm).toBe("residual");
    const means = out.means as Record<string, unknown>[];
    expect(Object.keys(means[0])).toEqual(["treatment", "mean", "se", "n", "group"]);
    expect(means.map((m) => m.treatment)).toEqual(["P1", "P2", "P3", "P4"]); // order of first appearance
    const comparisons = out.comparisons as Record<string, unknown>[];
    expect(comparisons).toHaveLength(6);
    expect(Object.keys(comparisons[0])).toEqual(["a", "b", "diff", "se", "lower", "upper", "p"]);
    // Balanced: HSD = q0.05(4, 15)·√(MSE/b); q0.05(4, 15) = 4.076 (standard studentized-range tables, value
    // from memory), MSE = 109.886/15 (Montgomery Ex 4.1)
    expect(out.hsd as number).toBeCloseTo(4.076 * Math.sqrt(109.886 / 15 / 6), 2);
    expect(out.lsd as number).toBeCloseTo(2.131 * Math.sqrt((2 * 109.886) / 15 / 6), 2); // standard tables: t0.975,15 = 2.131
  });

  it("prints a readable table by default", { timeout: 60_000 }, () => {
    const run = runBuilt(["--input", file("ex41-table.csv", ex41Csv()), "--response", "yield", "--treatment", "pressure", "--block", "batch"]);
    expect(run.status).toBe(0);
    expect(run.stdout).toContain("rcbd ANOVA of yield (n = 24, missing 0)");
    expect(run.stdout).toMatch(/^treatment\s+3\s+178\.1712\s/m); // Montgomery, DAE Ex 4.1: SS treatment 178.171 on 3 df
  });

  it("exits non-zero with a one-line reason for bad input", { timeout: 60_000 }, () => {
    const args = (input: string) => ["--input", input, "--response", "yield", "--treatment", "pressure", "--block", "batch"];
    const lines = ex41Csv().split("\n");
    const cases: [string, string, RegExp][] = [
      ["missing column", lines.join("\n").replace("batch,", "replicate,"), /^the file has no column "batch" \(columns: replicate, pressure, yield\)$/],
      ["single block", lines.filter((l, i) => i === 0 || l.startsWith("1,")).join("\n"), /^an RCBD needs at least 2 levels of block; the data have 1$/],
      ["treatment in no block", lines.map((l) => (l.startsWith("3,P2,") ? l.replace("3,P2,", ",P2,") : l)).join("\n"), /^a plot has no block \(treatment P2\)$/],
      ["non-numeric response", lines.join("\n").replace("90.3", "n/a"), /^row 2: yield "n\/a" is not a number$/],
    ];
    for (const [name, text, reason] of cases) {
      const run = runBuilt(args(file(`${name.replaceAll(" ", "-")}.csv`, text)));
      expect(run.status, name).toBe(1);
      expect(run.stdout, name).toBe("");
      expect(run.stderr.trimEnd(), name).toMatch(reason);
      expect(run.stderr.trimEnd().split("\n"), name).toHaveLength(1);
    }
  });
});

describe("the built tool's caches (build/cli/cache-…)", () => {
  it("writes a V8 code cache and the studentized-range nodes on a first run and prints the same with them, and without", { timeout: 60_000 }, () => {
    // The paper-strength data read as a split-plot in time: Tukey within seasons asks for a table.
    const text = csv(["block", "amendment", "season", "strength"], montgomerySplitPlot.map((p) => [p.levels.rep, `M${p.levels.method}`, `S${p.levels.temperature}`, p.value]));
    const args = ["--input", file("cached.csv", text), "--response", "strength", "--treatment", "amendment", "--block", "block", "--season", "season", "--format", "json"];
    const first = runBuilt(args); // builds the bundle if the sources changed
    expect(first.status).toBe(0);
    // The bundle's first line names its build; its caches are kept under that name.
    const build = /^\/\/ build ([\w-]+)\n/.exec(readFileSync(join(root, "build", "cli", "analyze.cjs"), "utf8"))![1];
    const cache = join(root, "build", "cli", `cache-${build}`);
    rmSync(cache, { recursive: true, force: true }); // as after a fresh build
    const cold = runBuilt(args);
    expect(existsSync(join(cache, "analyze.v8-code-cache"))).toBe(true);
    expect(readdirSync(join(cache, "studentized-range")).filter((name) => name.endsWith(".json")).length).toBeGreaterThan(0);
    const warm = runBuilt(args);
    expect(cold.stderr).toBe("");
    expect(warm.stdout).toBe(cold.stdout);
    expect(first.stdout).toBe(cold.stdout);
    expect(runInProcess(args).stdout).toBe(cold.stdout); // the TypeScript sources, no caches
  });
});

describe("command-line designs (main with captured output)", () => {
  it("factorial: Montgomery, DAE Example 5.1 with --factors, completely randomized", () => {
    const run = runInProcess(["--input", file("ex51.csv", ex51Csv()), "--response", "life", "--factors", "material,temperature", "--format", "json"]);
    expect(run.stderr).toBe("");
    const out = JSON.parse(run.stdout) as Record<string, unknown>;
    expect((out.anova as AnovaRowOut[]).map((r) => r.source)).toEqual(["material", "temperature", "material:temperature", "residual", "total"]);
    expect(rowOf(out, "material").ss).toBeCloseTo(10683.72, 2); // Montgomery, DAE Ex 5.1: SS material 10683.72
    expect(rowOf(out, "temperature").ss).toBeCloseTo(39118.72, 2); // Montgomery, DAE Ex 5.1: SS temperature 39118.72
    expect(rowOf(out, "material:temperature").ss).toBeCloseTo(9613.78, 2); // Montgomery, DAE Ex 5.1: SS interaction 9613.78
    expect(rowOf(out, "residual").ss).toBeCloseTo(18230.75, 2); // Montgomery, DAE Ex 5.1: SS error 18230.75
    expect(rowOf(out, "residual").df).toBe(27); // Montgomery, DAE Ex 5.1: 27 df
    expect((out.means as unknown[]).length).toBe(9);
    expect((out.means as { treatment: string }[])[0].treatment).toBe("1:15");
  });

  it("split-plot: Montgomery, DAE paper-strength example with --main/--sub; block:A is error(a)", () => {
    const run = runInProcess([
      "--input", file("paper.csv", splitPlotCsv()), "--response", "strength", "--main", "method", "--sub", "temperature", "--block", "rep", "--format", "json",
    ]);
    expect(run.stderr).toBe("");
    const out = JSON.parse(run.stdout) as Record<string, unknown>;
    expect((out.anova as AnovaRowOut[]).map((r) => r.source)).toEqual([
      "block", "method", "block:method", "temperature", "method:temperature", "residual", "total",
    ]);
    expect(rowOf(out, "block").ss).toBeCloseTo(77.56, 2); // Montgomery, DAE split-plot: SS replicates 77.56
    expect(rowOf(out, "method").ss).toBeCloseTo(128.39, 2); // Montgomery, DAE split-plot: SS method 128.39
    expect(rowOf(out, "block:method").ss).toBeCloseTo(36.28, 2); // Montgomery, DAE split-plot: error(a) 36.28
    expect(rowOf(out, "block:method").df).toBe(4); // Montgomery, DAE split-plot: error(a) 4 df
    expect(rowOf(out, "method").f).toBeCloseTo(7.08, 2); // Montgomery, DAE split-plot: F method 7.08
    expect(rowOf(out, "method").errorTerm).toBe("block:method");
    expect(rowOf(out, "temperature").f).toBeCloseTo(36.43, 2); // Montgomery, DAE split-plot: F temperature 36.43
    expect(rowOf(out, "method:temperature").f).toBeCloseTo(3.15, 2); // Montgomery, DAE split-plot: F interaction 3.15
    expect(rowOf(out, "residual").df).toBe(18); // Montgomery, DAE split-plot: error(b) 18 df
  });

  it("seasons: the paper-strength data read as a split-plot in time, treatments compared within each season", () => {
    // Replicates as blocks, methods as treatments, the four temperatures standing in for seasons.
    const text = csv(["block", "amendment", "season", "strength"], montgomerySplitPlot.map((p) => [p.levels.rep, `M${p.levels.method}`, `S${p.levels.temperature}`, p.value]));
    const run = runInProcess([
      "--input", file("seasons.csv", text), "--response", "strength", "--treatment", "amendment", "--block", "block", "--season", "season", "--format", "json",
    ]);
    expect(run.stderr).toBe("");
    const out = JSON.parse(run.stdout) as Record<string, unknown>;
    expect(out.model).toBe("split-plot in time");
    expect((out.anova as AnovaRowOut[]).map((r) => r.source)).toEqual([
      "block", "treatment", "block:treatment", "season", "treatment:season", "residual", "total",
    ]);
    expect(rowOf(out, "block:treatment").ss).toBeCloseTo(36.28, 2); // Montgomery, DAE split-plot: error(a) 36.28
    expect(rowOf(out, "treatment").errorTerm).toBe("block:treatment");
    expect(rowOf(out, "season").f).toBeCloseTo(36.43, 2); // Montgomery, DAE split-plot: F temperature 36.43
    expect(rowOf(out, "treatment:season").f).toBeCloseTo(3.15, 2); // Montgomery, DAE split-plot: F interaction 3.15
    const means = out.means as Record<string, unknown>[];
    expect(means).toHaveLength(12);
    expect(Object.keys(means[0])).toEqual(["treatment", "season", "mean", "se", "n", "group"]);
    expect(means[0]).toMatchObject({ treatment: "M1", season: "S200", n: 3 });
    expect(means[0].mean as number).toBeCloseTo((30 + 28 + 31) / 3, 10); // Montgomery, DAE split-plot data: method 1 at 200 °F
    expect((out.comparisons as unknown[]).length).toBe(4 * 3); // 3 pairs of treatments in each of 4 seasons
    // Treatments within one season mix strata: SE = √(2[(b − 1)E_b + E_a]/(rb)) with Satterthwaite df
    // (Gomez & Gomez 1984, §3.4.2; Satterthwaite 1946), r = 3 blocks, b = 4 seasons,
    // E_a = 36.28/4, E_b = 71.50/18 (Montgomery, DAE split-plot).
    const [r, b, ea, eb] = [3, 4, 36.2778 / 4, 71.5 / 18];
    const se = Math.sqrt((2 * ((b - 1) * eb + ea)) / (r * b));
    const df = ((b - 1) * eb + ea) ** 2 / (((b - 1) * eb) ** 2 / 18 + ea ** 2 / 4);
    expect((out.comparisons as { se: number }[])[0].se).toBeCloseTo(se, 3);
    expect(out.hsd as number).toBeCloseTo((studentizedRangeQuantile(0.95, 3, df) * se) / Math.SQRT2, 3);
    expect((out.notes as string[])[0]).toMatch(/^Greenhouse–Geisser ε = \d\.\d{3}; corrected season p = /);
  });

  it("completely randomized without --block: a one-way ANOVA", () => {
    // Montgomery, DAE Ex 4.1 read as completely randomized: SS treatment 178.171 on 3 df, the
    // residual pools block and error, 192.252 + 109.886 on 5 + 15 df.
    const run = runInProcess(["--input", file("oneway.csv", ex41Csv()), "--response", "yield", "--treatment", "pressure", "--format", "json"]);
    const out = JSON.parse(run.stdout) as Record<string, unknown>;
    expect((out.anova as AnovaRowOut[]).map((r) => r.source)).toEqual(["treatment", "residual", "total"]);
    expect(rowOf(out, "treatment").ss).toBeCloseTo(178.171, 3); // Montgomery, DAE Ex 4.1: SS treatment 178.171
    expect(rowOf(out, "residual").ss).toBeCloseTo(192.252 + 109.886, 3); // Montgomery, DAE Ex 4.1: SS block + SS error
    expect(rowOf(out, "residual").df).toBe(20);
  });

  it("says what is wrong with the command line, and --help prints the usage", () => {
    const help = runInProcess(["--help"]);
    expect(help.status).toBe(0);
    expect(help.stdout).toMatch(/^usage: npm run --silent analyze -- --input FILE\.csv --response COL/);
    const missing = runInProcess(["--input", join(dir, "no-such.csv"), "--response", "y", "--treatment", "t"]);
    expect(missing.status).toBe(1);
    expect(missing.stderr).toBe(`cannot read ${join(dir, "no-such.csv")}: no such file\n`);
    expect(runInProcess(["--input", "x.csv", "--response", "y", "--main", "a", "--sub", "b", "--season", "s"]).stderr).toMatch(
      /^--season cannot be combined with --main\/--sub/,
    );
    expect(runInProcess(["--input", "x.csv", "--response", "y", "--factors", "a"]).stderr).toMatch(/^--factors takes two or three column names/);
  });

  it("lists split-plot means without comparisons when a sub-plot is missing, and says why", () => {
    const text = splitPlotCsv().split("\n").map((l, i) => (i === 6 ? l.replace(/,[^,]*$/, ",") : l)).join("\n");
    const run = runInProcess(["--input", file("paper-missing.csv", text), "--response", "strength", "--main", "method", "--sub", "temperature", "--block", "rep", "--format", "json"]);
    expect(run.status).toBe(0);
    const out = JSON.parse(run.stdout) as Record<string, unknown>;
    expect(rowOf(out, "residual").df).toBe(17); // Montgomery split-plot error(b) 18 df less one missing value
    expect(out.comparisons).toEqual([]);
    expect((out.notes as string[]).join(" ")).toMatch(/mixed model/);
  });
});
