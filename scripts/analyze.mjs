// `npm run analyze -- …`: runs the analysis command-line tool as compiled JavaScript from
// build/cli/analyze.mjs, first rebuilding that bundle with esbuild when any source under
// analysis/ (or this launcher, or the installed packages) is newer than it. Researchers call the
// tool from scripts in loops, so an up-to-date bundle is run without loading esbuild or a
// TypeScript loader.
import { existsSync, mkdirSync, readdirSync, renameSync, rmSync, statSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const entry = join(root, "analysis", "cli.ts");
const bundle = join(root, "build", "cli", "analyze.mjs");

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

/** Bundles analysis/cli.ts and its packages into one ES module; written aside, then renamed into place. */
async function buildBundle() {
  const { build } = await import("esbuild");
  mkdirSync(dirname(bundle), { recursive: true });
  const temporary = join(dirname(bundle), `.analyze-${process.pid}.mjs`);
  try {
    await build({
      entryPoints: [entry],
      outfile: temporary,
      bundle: true,
      platform: "node",
      format: "esm",
      target: "node20",
      // Bundled CommonJS packages (jstat, papaparse) may call require() for Node's own modules.
      banner: { js: 'import { createRequire as __createRequire } from "node:module"; const require = __createRequire(import.meta.url);' },
      minify: true,
      logLevel: "error",
    });
    renameSync(temporary, bundle);
  } finally {
    rmSync(temporary, { force: true });
  }
}

if (!existsSync(bundle) || statSync(bundle).mtimeMs < newestSourceMs()) {
  // An app build empties build/ and may do so mid-way: try once more before giving up.
  await buildBundle().catch(() => buildBundle());
}
const { main } = await import(pathToFileURL(bundle).href);
process.exitCode = main(process.argv.slice(2));
