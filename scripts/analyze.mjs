// `npm run analyze -- …`: runs the analysis command-line tool as compiled JavaScript from
// build/cli/analyze.cjs, first rebuilding that bundle with esbuild when any source under
// analysis/ (or this launcher, or the installed packages) is newer than it. Researchers call the
// tool from scripts in loops, so an up-to-date bundle is run without loading esbuild or a
// TypeScript loader, from V8's code cache, and with the studentized-range nodes earlier runs
// computed; both caches sit in a folder named after the bundle's build, so a new bundle never sees them.
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { setFlagsFromString } from "node:v8";
import { Script } from "node:vm";

// A run takes a fraction of a second, mostly in code V8 would optimize in background threads it
// then barely uses; on two busy CPUs that work delays the run. Sixteen times V8's default budget
// (66 KB of bytecode) before a function is optimized leaves long analyses (least squares on a large
// unbalanced trial) as fast as before. Set before the bundle is compiled; a V8 without the flag ignores it.
setFlagsFromString("--interrupt-budget=1048576");

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const entry = join(root, "analysis", "cli.ts");
const folder = join(root, "build", "cli");
const bundle = join(folder, "analyze.cjs");
/** The bundle's first line names its build; its caches are kept under that name. */
const BUILD_LINE = /^\/\/ build ([\w-]+)\n/;

/** Latest modification time (ms) of the files the bundle is made from. */
function newestSourceMs() {
  let newest = 0;
  const visit = (dir) => {
    for (const item of readdirSync(dir, { withFileTypes: true })) {
      const path = join(dir, item.name);
      if (item.isDirectory()) visit(path);
      else newest = Math.max(newest, statSync(path).mtimeMs);
    }
  };
  visit(join(root, "analysis"));
  for (const file of [fileURLToPath(import.meta.url), join(root, "package-lock.json")]) {
    if (existsSync(file)) newest = Math.max(newest, statSync(file).mtimeMs);
  }
  return newest;
}

/**
 * Writes a file aside, then renames it into place: parallel runs read the old or the new file,
 * never a part. Failing is no error: it is a cache, and the run's results stand without it.
 */
function writeAtomically(path, data) {
  const temporary = `${path}.${process.pid}.tmp`;
  try {
    mkdirSync(dirname(path), { recursive: true });
    writeFileSync(temporary, data);
    renameSync(temporary, path);
  } catch {
    try {
      rmSync(temporary, { force: true });
    } catch {
      // the folder itself cannot be used; nothing was written
    }
  }
}

/**
 * Bundles analysis/cli.ts and its packages into one CommonJS file (which V8 can compile from a
 * code cache, unlike an ES module), its first line naming the build; written aside, then renamed
 * into place.
 */
async function buildBundle() {
  const { build } = await import("esbuild");
  const { randomUUID } = await import("node:crypto");
  mkdirSync(folder, { recursive: true });
  const temporary = join(folder, `.analyze-${process.pid}.cjs`);
  try {
    await build({
      entryPoints: [entry],
      outfile: temporary,
      bundle: true,
      platform: "node",
      format: "cjs",
      target: "node20",
      banner: { js: `// build ${randomUUID()}` },
      // The launcher calls main(); cli.ts's check for being run directly (tsx analysis/cli.ts) stays off.
      define: { "import.meta.url": "undefined" },
      minify: true,
      logLevel: "error",
    });
    renameSync(temporary, bundle);
  } finally {
    rmSync(temporary, { force: true });
  }
}

/** Removes the cache folders of other builds: earlier ones, or parallel rebuilds of the same sources. */
function removeOtherCaches(keep) {
  try {
    for (const name of readdirSync(folder)) {
      if (name.startsWith("cache-") && join(folder, name) !== keep) rmSync(join(folder, name), { recursive: true, force: true });
    }
  } catch {
    // build/ emptied meanwhile: nothing left to remove
  }
}

/**
 * The bundle's source and the folder of its caches, named after the build in its first line (not
 * after its size or time, which a rebuild can leave unchanged); null when there is no bundle, or
 * one without a build line.
 */
function readBundle() {
  let source;
  try {
    source = readFileSync(bundle, "utf8");
  } catch (error) {
    if (error.code === "ENOENT") return null;
    throw error;
  }
  const build = BUILD_LINE.exec(source)?.[1];
  return build ? { source, cache: join(folder, `cache-${build}`) } : null;
}

/**
 * Runs the bundle as Node runs a CommonJS module (same wrapper and arguments), compiled with the
 * code cache V8 wrote after an earlier run when there is one, and writes that cache when there
 * was none (the bundle's first run: the other bundles' caches go then) or V8 refused it (another
 * Node version). Returns main()'s exit code.
 */
function runBundle({ source, cache }, argv) {
  const codeCache = join(cache, "analyze.v8-code-cache");
  let cachedData;
  try {
    cachedData = readFileSync(codeCache);
  } catch {
    cachedData = undefined;
  }
  const script = new Script(`(function (exports, require, module, __filename, __dirname) {${source}\n})`, { filename: bundle, cachedData });
  const module = { exports: {} };
  script.runInThisContext()(module.exports, createRequire(bundle), module, bundle, folder);
  const exitCode = module.exports.main(argv, undefined, { studentizedRangeNodes: join(cache, "studentized-range") });
  // Created after the run, the cache holds the functions compiled lazily while it ran.
  if (cachedData === undefined || script.cachedDataRejected) {
    writeAtomically(codeCache, script.createCachedData());
    removeOtherCaches(cache);
  }
  return exitCode;
}

let loaded = existsSync(bundle) && statSync(bundle).mtimeMs >= newestSourceMs() ? readBundle() : null;
if (loaded === null) {
  // An app build empties build/, and may do so mid-way: try once more before giving up.
  await buildBundle().catch(() => buildBundle());
  loaded = readBundle();
  if (loaded === null) throw new Error(`${bundle} was removed as it was being built; run the command again`);
}
process.exitCode = runBundle(loaded, process.argv.slice(2));
