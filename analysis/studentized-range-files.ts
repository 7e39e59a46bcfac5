// The command-line tool's store of jstat's studentized-range node values: one small JSON file per
// (number of means, df) in a folder under build/cli, so that a run reads back the nodes earlier
// runs paid for (half a millisecond of jstat each) instead of computing them again.
import { mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { STUDENTIZED_RANGE_STEP, type StudentizedRangeNodeStore } from "./stats/studentized-range-table";

/** Tables kept in the folder; past this the least recently written go (each file is a few kilobytes). */
export const MAX_NODE_FILES = 64;

/** One file's content: the lattice spacing it was computed on, the table's parameters and [node index, jstat's CDF] pairs. */
interface NodeFile {
  step: number;
  nMeans: number;
  df: number;
  nodes: [number, number][];
}

const fileName = (nMeans: number, df: number) => `${nMeans}-${df}.json`;

/** The node values in a file, or undefined when it is absent, unreadable or for another table or lattice. */
function readNodes(path: string, nMeans: number, df: number): Map<number, number> | undefined {
  let file: NodeFile;
  try {
    file = JSON.parse(readFileSync(path, "utf8")) as NodeFile;
  } catch {
    return undefined;
  }
  if (file?.step !== STUDENTIZED_RANGE_STEP || file.nMeans !== nMeans || file.df !== df || !Array.isArray(file.nodes)) return undefined;
  const nodes = new Map<number, number>();
  for (const entry of file.nodes) {
    // A damaged file is ignored whole: the nodes are computed again and the file rewritten.
    if (!Array.isArray(entry) || !Number.isInteger(entry[0]) || !(typeof entry[1] === "number" && entry[1] >= 0 && entry[1] <= 1)) return undefined;
    nodes.set(entry[0], entry[1]);
  }
  return nodes;
}

/** Removes the least recently written node files beyond MAX_NODE_FILES. */
function prune(folder: string): void {
  const files = readdirSync(folder).filter((name) => name.endsWith(".json"));
  if (files.length <= MAX_NODE_FILES) return;
  const byAge = files
    .map((name) => {
      try {
        return { name, written: statSync(join(folder, name)).mtimeMs };
      } catch {
        return { name, written: Number.NEGATIVE_INFINITY }; // removed meanwhile by a parallel run
      }
    })
    .sort((a, b) => a.written - b.written);
  for (const { name } of byAge.slice(0, files.length - MAX_NODE_FILES)) rmSync(join(folder, name), { force: true });
}

/** Removes a file if there is one and it can be removed. */
function removeQuietly(path: string): void {
  try {
    rmSync(path, { force: true });
  } catch {
    // the folder itself cannot be used; nothing was written
  }
}

let temporaryFiles = 0;

/**
 * A node store in `folder` (created when first written). Writes go to a temporary file renamed
 * over the table's file, so a parallel run reads either the old or the new file, never half of
 * one; a save merges what the file holds by then, so parallel runs lose no values they both wrote.
 * Values are JSON numbers, which read back as the same doubles. A store that cannot be read or
 * written is no error: the nodes are then computed as if there were no store.
 */
export function studentizedRangeFileStore(folder: string): StudentizedRangeNodeStore {
  return {
    load: (nMeans, df) => readNodes(join(folder, fileName(nMeans, df)), nMeans, df),
    save(nMeans, df, cdfByNode) {
      const path = join(folder, fileName(nMeans, df));
      const temporary = join(folder, `.${fileName(nMeans, df)}.${process.pid}.${temporaryFiles++}`);
      try {
        mkdirSync(folder, { recursive: true });
        const merged = new Map([...(readNodes(path, nMeans, df) ?? []), ...cdfByNode]);
        const file: NodeFile = { step: STUDENTIZED_RANGE_STEP, nMeans, df, nodes: [...merged].sort((a, b) => a[0] - b[0]) };
        writeFileSync(temporary, JSON.stringify(file));
        renameSync(temporary, path);
        prune(folder);
      } catch {
        removeQuietly(temporary);
      }
    },
  };
}
