// npm run bench:analysis — times the analysis engine on a generated trial of 24 treatments ×
// 6 blocks × 12 seasons × 4 depths, then one `npm run --silent analyze` of a 1,728-row
// split-plot-in-time file. Prints figures; asserts nothing (targets: < 1 s and < 0.7 s).
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { availableParallelism, loadavg, tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { mulberry32, type UniformSource } from "../../analysis/design/random";
import {
  orthogonalPolynomialContrasts,
  rcbdAnova,
  seasonsAnalysis,
  separateMeans,
  separateMeansWithin,
  testContrasts,
  treatmentVsCheckContrasts,
  type ContrastSpec,
  type LeveledPlot,
} from "../../analysis/stats";

const TREATMENTS = Array.from({ length: 24 }, (_, i) => `T${String(i + 1).padStart(2, "0")}`);
const BLOCKS = Array.from({ length: 6 }, (_, i) => String(i + 1));
const SEASONS = Array.from({ length: 12 }, (_, i) => `${2025 + Math.floor(i / 2)} ${i % 2 === 0 ? "spring" : "fall"}`);
const DEPTHS = ["0-10", "10-20", "20-30", "30-40"];

/** Standard normal draw by the Box–Muller transform (Box & Muller 1958, Ann. Math. Stat. 29:610–611). */
function normal(random: UniformSource): number {
  return Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random());
}

interface TrialRow {
  depth: string;
  season: string;
  block: string;
  treatment: string;
  soc: number;
}

/**
 * An invented trial: SOC % falls with depth; treatments raise it by up to 0.6 points, growing
 * over the seasons and fading with depth; blocks, whole plots and single samples add noise.
 */
function generateTrial(seed: number): TrialRow[] {
  const random = mulberry32(seed);
  const rows: TrialRow[] = [];
  const treatmentEffect = TREATMENTS.map((_, t) => (t === 0 ? 0 : 0.6 * random()));
  const blockEffect = BLOCKS.map(() => 0.15 * normal(random));
  DEPTHS.forEach((depth, d) => {
    const plotEffect = BLOCKS.map(() => TREATMENTS.map(() => 0.1 * normal(random)));
    SEASONS.forEach((season, s) => {
      BLOCKS.forEach((block, b) => {
        TREATMENTS.forEach((treatment, t) => {
          const soc =
            2.4 - 0.45 * d + treatmentEffect[t] * ((s + 1) / SEASONS.length) / (d + 1) + blockEffect[b] + plotEffect[b][t] + 0.12 * normal(random);
          rows.push({ depth, season, block, treatment, soc: Math.round(soc * 1000) / 1000 });
        });
      });
    });
  });
  return rows;
}

const asLeveled = (rows: readonly TrialRow[]): LeveledPlot[] =>
  rows.map((r) => ({ levels: { block: r.block, treatment: r.treatment, season: r.season }, value: r.soc }));

interface Counts {
  anovas: number;
  pairs: number;
  contrasts: number;
}

/** Every analysis a researcher would run on the trial; returns how much was done. */
function analyseTrial(rows: readonly TrialRow[], timings: Record<string, number>): Counts {
  const counts: Counts = { anovas: 0, pairs: 0, contrasts: 0 };
  const contrasts: ContrastSpec[] = [
    ...treatmentVsCheckContrasts(TREATMENTS, TREATMENTS[0]),
    // The first five treatments read as equally spaced rates of one amendment.
    ...orthogonalPolynomialContrasts(5).map((c) => ({ ...c, coefficients: [...c.coefficients, ...new Array(19).fill(0)] })),
  ];
  const time = <T>(label: string, run: () => T): T => {
    const start = performance.now();
    const out = run();
    timings[label] = (timings[label] ?? 0) + performance.now() - start;
    return out;
  };
  for (const depth of DEPTHS) {
    const atDepth = rows.filter((r) => r.depth === depth);
    for (const season of SEASONS) {
      const plots = atDepth.filter((r) => r.season === season).map(({ block, treatment, soc }) => ({ block, treatment, value: soc }));
      const result = time("per-season RCBD ANOVAs", () => rcbdAnova(plots));
      const separation = time("per-season Tukey comparisons and letters", () => separateMeans(result, "treatment", { method: "tukey" }));
      const tested = time("per-season contrasts", () => testContrasts(result, "treatment", contrasts));
      counts.anovas += 1;
      counts.pairs += separation.comparisons.length;
      counts.contrasts += tested.length;
    }
    const layout = { block: "block", treatments: ["treatment"], season: "season" };
    const result = time("split-plot in time ANOVAs", () => seasonsAnalysis(asLeveled(atDepth), layout));
    const within = time("split-plot Tukey within each season and letters", () =>
      separateMeansWithin(result, "treatment:season", "season", { method: "tukey" }),
    );
    const tested = time("split-plot contrasts", () => testContrasts(result, "treatment", contrasts));
    counts.anovas += 1;
    counts.pairs += Object.values(within).reduce((s, sep) => s + sep.comparisons.length, 0);
    counts.contrasts += tested.length;
  }
  return counts;
}

function toCsv(rows: readonly TrialRow[]): string {
  return ["block,treatment,season,soc", ...rows.map((r) => `${r.block},${r.treatment},${r.season},${r.soc}`)].join("\n");
}

const ms = (x: number) => `${x.toFixed(0).padStart(6)} ms`;

/**
 * CPU time (user + system, ms) of the finished child processes of this one, from /proc/self/stat
 * (Linux; 10 ms ticks) — wall-clock figures swell when other work shares the machine, CPU time
 * much less. Null where /proc is absent.
 */
function childrenCpuMs(): number | null {
  try {
    const fields = readFileSync("/proc/self/stat", "utf8").split(") ")[1].split(" ");
    return ((Number(fields[13]) + Number(fields[14])) * 1000) / 100; // cutime + cstime, in 1/100 s
  } catch {
    return null;
  }
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

function benchLibrary(rows: readonly TrialRow[]): void {
  console.log(`library: ${TREATMENTS.length} treatments × ${BLOCKS.length} blocks × ${SEASONS.length} seasons × ${DEPTHS.length} depths = ${rows.length} rows`);
  for (const pass of ["first pass (cold caches)", "second pass"]) {
    const timings: Record<string, number> = {};
    const start = performance.now();
    const cpuStart = process.cpuUsage();
    const counts = analyseTrial(rows, timings);
    const total = performance.now() - start;
    const cpu = process.cpuUsage(cpuStart);
    console.log(`  ${pass}: ${ms(total)} wall, ${ms((cpu.user + cpu.system) / 1000)} CPU (target < 1000 ms)`);
    console.log(`    ${counts.anovas} ANOVAs, ${counts.pairs} Tukey pairs with letters, ${counts.contrasts} contrasts`);
    for (const [label, t] of Object.entries(timings)) console.log(`    ${label.padEnd(50)} ${ms(t)}`);
  }
}

function benchCommandLine(rows: readonly TrialRow[]): void {
  const root = join(dirname(fileURLToPath(import.meta.url)), "..", "..");
  const dir = mkdtempSync(join(tmpdir(), "tilthmark-bench-"));
  try {
    const file = join(dir, "split-plot-in-time.csv");
    const oneDepth = rows.filter((r) => r.depth === DEPTHS[0]);
    writeFileSync(file, toCsv(oneDepth));
    const args = ["--input", file, "--response", "soc", "--treatment", "treatment", "--block", "block", "--season", "season", "--format", "json"];
    const run = (command: string, commandArgs: string[]) => {
      const cpuBefore = childrenCpuMs();
      const start = performance.now();
      const out = spawnSync(command, commandArgs, { cwd: root, encoding: "utf8" });
      const wall = performance.now() - start;
      const cpuAfter = childrenCpuMs();
      if (out.status !== 0) throw new Error(`the command-line tool failed: ${out.stderr}`);
      return { wall, cpu: cpuBefore === null || cpuAfter === null ? Number.NaN : cpuAfter - cpuBefore, stdout: out.stdout };
    };
    console.log(`command line: npm run --silent analyze -- … on ${oneDepth.length} rows (split-plot in time), wall clock`);
    const first = run("npm", ["run", "--silent", "analyze", "--", ...args]);
    const parsed = JSON.parse(first.stdout) as { anova: { source: string }[]; comparisons: unknown[] };
    console.log(`  first run (rebuilds build/cli/analyze.cjs and its caches if the sources changed): ${ms(first.wall)}`);
    const runs = Array.from({ length: 7 }, () => run("npm", ["run", "--silent", "analyze", "--", ...args]));
    const walls = runs.map((r) => r.wall);
    console.log(`  next 7 runs: median ${ms(median(walls))} wall (min ${ms(Math.min(...walls))}, max ${ms(Math.max(...walls))}), median ${ms(median(runs.map((r) => r.cpu)))} CPU (target < 700 ms wall)`);
    const direct = Array.from({ length: 5 }, () => run(process.execPath, [join(root, "scripts", "analyze.mjs"), ...args]));
    const bare = Array.from({ length: 5 }, () => run(process.execPath, ["-e", "0"]));
    console.log("  for reference, medians of 5 (wall / CPU):");
    console.log(`    node scripts/analyze.mjs, without npm ${ms(median(direct.map((r) => r.wall)))} / ${ms(median(direct.map((r) => r.cpu)))}`);
    console.log(`    an empty node process                 ${ms(median(bare.map((r) => r.wall)))} / ${ms(median(bare.map((r) => r.cpu)))}`);
    console.log(`  (${parsed.anova.length} ANOVA rows, ${parsed.comparisons.length} comparisons in the output)`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const rows = generateTrial(2025);
const load = loadavg()[0];
console.log(`machine: ${availableParallelism()} CPUs, load average ${load.toFixed(2)}${load > availableParallelism() ? " — busy; wall-clock figures are inflated" : ""}`);
benchLibrary(rows);
benchCommandLine(rows);
