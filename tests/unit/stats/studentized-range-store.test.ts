import { mkdtempSync, readdirSync, readFileSync, rmSync, utimesSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { MAX_NODE_FILES, studentizedRangeFileStore } from "../../../analysis/studentized-range-files";
import type { StudentizedRangeNodeStore } from "../../../analysis/stats/studentized-range-table";

// Stored node values stand in for the jstat calls they came from, so a table read from a store
// must give every p-value and quantile bit for bit as one computed from jstat (no tolerance).

type TableModule = typeof import("../../../analysis/stats/studentized-range-table");

/** The table module with none of its tables built yet (a fresh process, as each CLI run is). */
async function freshTableModule(): Promise<TableModule> {
  vi.resetModules();
  return import("../../../analysis/stats/studentized-range-table");
}

/** A store in memory that records what it is asked to save. */
function memoryStore(initial = new Map<string, Map<number, number>>()) {
  const tables = new Map([...initial].map(([key, nodes]) => [key, new Map(nodes)]));
  const saves: string[] = [];
  const store: StudentizedRangeNodeStore = {
    load: (nMeans, df) => tables.get(`${nMeans}|${df}`),
    save: (nMeans, df, cdfByNode) => {
      saves.push(`${nMeans}|${df}`);
      tables.set(`${nMeans}|${df}`, new Map(cdfByNode));
    },
  };
  return { store, tables, saves };
}

// Families as the CLI meets them: Satterthwaite df of a split-plot in time, a small RCBD.
const families: [nMeans: number, df: number][] = [
  [24, 1434.2842192363269],
  [5, 12],
];
// q across both tails and the body, and the quantiles a report asks for.
const qs = Array.from({ length: 120 }, (_, i) => Math.exp(Math.log(0.02) + (i / 119) * Math.log(40 / 0.02)));

function everyValue(table: TableModule): number[] {
  return families.flatMap(([k, df]) => [
    ...qs.map((q) => table.studentizedRangeUpperPTabulated(q, k, df)),
    ...[0.9, 0.95, 0.99].map((p) => table.studentizedRangeQuantileTabulated(p, k, df)),
  ]);
}

describe("studentized-range nodes kept between processes", () => {
  it("gives the same values, bit for bit, from stored nodes as from jstat, and saves nothing when every node was stored", { timeout: 60_000 }, async () => {
    const first = memoryStore();
    const computing = await freshTableModule();
    computing.useStudentizedRangeNodeStore(first.store);
    const fromJstat = everyValue(computing);
    computing.saveStudentizedRangeNodes();
    expect(first.saves.sort()).toEqual(["24|1434.284219", "5|12"]);

    const second = memoryStore(first.tables);
    const reading = await freshTableModule();
    reading.useStudentizedRangeNodeStore(second.store);
    const fromStore = everyValue(reading);
    reading.saveStudentizedRangeNodes();
    fromStore.forEach((value, i) => expect(Object.is(value, fromJstat[i]), `value ${i}: ${value} vs ${fromJstat[i]}`).toBe(true));
    // A node missing from the store would have been computed by jstat and saved back.
    expect(second.saves).toEqual([]);
  });

  it("computes only the nodes a store lacks and saves the table whole", { timeout: 60_000 }, async () => {
    const complete = memoryStore();
    const computing = await freshTableModule();
    computing.useStudentizedRangeNodeStore(complete.store);
    const fromJstat = everyValue(computing);
    computing.saveStudentizedRangeNodes();

    // Every other node forgotten.
    const partial = new Map([...complete.tables].map(([key, nodes]) => [key, new Map([...nodes].filter((_, i) => i % 2 === 0))]));
    const second = memoryStore(partial);
    const reading = await freshTableModule();
    reading.useStudentizedRangeNodeStore(second.store);
    const values = everyValue(reading);
    reading.saveStudentizedRangeNodes();
    values.forEach((value, i) => expect(Object.is(value, fromJstat[i])).toBe(true));
    expect(second.saves.sort()).toEqual(["24|1434.284219", "5|12"]);
    for (const [key, nodes] of complete.tables) expect(second.tables.get(key)).toEqual(nodes);
  });
});

describe("node files (analysis/studentized-range-files.ts)", () => {
  let dir = "";
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), "tilthmark-nodes-"));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it("reads back exactly the doubles written, leaving no temporary file", () => {
    const folder = join(dir, "round-trip", "nodes"); // created on first write
    const awkward = new Map([
      [-12, 0],
      [-4, 5.8030727013237525e-12],
      [3, 0.1 + 0.2],
      [7, 1e-300],
      [40, 1 - 2 ** -53],
      [41, 1],
    ]);
    const store = studentizedRangeFileStore(folder);
    expect(store.load(24, 115.5)).toBeUndefined();
    store.save(24, 115.5, awkward);
    const read = store.load(24, 115.5)!;
    expect([...read.keys()]).toEqual([...awkward.keys()]);
    for (const [i, cdf] of awkward) expect(Object.is(read.get(i), cdf)).toBe(true);
    expect(store.load(24, 115.6)).toBeUndefined(); // another df, another table
    expect(readdirSync(folder)).toEqual(["24-115.5.json"]);
  });

  it("keeps what a parallel run wrote to the same table", () => {
    const folder = join(dir, "parallel");
    const runA = studentizedRangeFileStore(folder);
    const runB = studentizedRangeFileStore(folder);
    runA.save(5, 12, new Map([[1, 0.25], [2, 0.5]]));
    runB.save(5, 12, new Map([[2, 0.5], [3, 0.75]]));
    expect(runA.load(5, 12)).toEqual(new Map([[1, 0.25], [2, 0.5], [3, 0.75]]));
  });

  it("ignores a damaged file, or one made on another lattice, and writes a good one over it", () => {
    const folder = join(dir, "damaged");
    const store = studentizedRangeFileStore(folder);
    store.save(3, 12, new Map([[20, 0.4]]));
    const path = join(folder, "3-12.json");
    const good = JSON.parse(readFileSync(path, "utf8")) as Record<string, unknown>;
    for (const bad of ['{"step":0.0625,"nMeans":3', JSON.stringify({ ...good, step: 1 / 8 }), JSON.stringify({ ...good, nodes: [[20, 1.5]] }), JSON.stringify({ ...good, nodes: [[20.5, 0.4]] })]) {
      writeFileSync(path, bad);
      expect(store.load(3, 12), bad).toBeUndefined();
    }
    store.save(3, 12, new Map([[21, 0.45]]));
    expect(store.load(3, 12)).toEqual(new Map([[21, 0.45]]));
  });

  it(`keeps at most ${MAX_NODE_FILES} tables, dropping the least recently written`, () => {
    const folder = join(dir, "bounded");
    const store = studentizedRangeFileStore(folder);
    const epoch = Date.now() / 1000 - 10_000;
    for (let k = 2; k < 2 + MAX_NODE_FILES; k++) {
      store.save(k, 10, new Map([[0, 0.1]]));
      utimesSync(join(folder, `${k}-10.json`), epoch + k, epoch + k); // k = 2 is the oldest
    }
    store.save(100, 10, new Map([[0, 0.1]]));
    const files = readdirSync(folder);
    expect(files).toHaveLength(MAX_NODE_FILES);
    expect(files).not.toContain("2-10.json");
    expect(files).toContain("3-10.json");
    expect(files).toContain("100-10.json");
  });

  it("is no error when the folder cannot be written: nodes are then simply not kept", () => {
    const blocker = join(dir, "a-file");
    writeFileSync(blocker, "");
    const store = studentizedRangeFileStore(join(blocker, "nodes"));
    expect(() => store.save(4, 20, new Map([[0, 0.1]]))).not.toThrow();
    expect(store.load(4, 20)).toBeUndefined();
  });
});
