// npm run bench:intake — 50,000 LOI rows through lab intake: prints rows per second for
// parse + validate and for commit (which re-checks inside its transaction, then writes with
// multi-row INSERTs). A figure to read, never a pass/fail test.
//
// Uses DATABASE_URL's cluster when set (a scratch database is created and dropped on it);
// otherwise starts a private cluster "bench" on port 54349 and stops it afterwards.
import { execFileSync } from "node:child_process";
import { randomBytes, randomUUID } from "node:crypto";
import pg from "pg";

const ROWS = 50_000;
const TREATMENTS = 10;
const BLOCKS = 25;
const DEPTHS = [0, 10, 20, 30, 40].map((top) => ({ topCm: top, bottomCm: top + 10 })).slice(0, 4);
const EVENTS = ROWS / (TREATMENTS * BLOCKS * DEPTHS.length);

let stopCluster = false;
let baseUrl = process.env.DATABASE_URL;
if (!baseUrl) {
  execFileSync("bash", ["scripts/pg.sh", "start", "bench", "54349"], { stdio: "inherit" });
  baseUrl = execFileSync("bash", ["scripts/pg.sh", "url", "bench", "54349"]).toString().trim();
  stopCluster = true;
}
const scratch = `bench_${randomBytes(4).toString("hex")}`;
const adminUrl = new URL(baseUrl);
adminUrl.pathname = "/postgres";
const admin = new pg.Client({ connectionString: adminUrl.toString() });
await admin.connect();
await admin.query(`create database "${scratch}"`);
const url = new URL(baseUrl);
url.pathname = `/${scratch}`;
process.env.DATABASE_URL = url.toString();
execFileSync("npx", ["tsx", "scripts/migrate.ts"], { stdio: "inherit", env: process.env });

const seconds = (start: bigint) => Number(process.hrtime.bigint() - start) / 1e9;
const rate = (n: number, s: number) => `${Math.round(n / s).toLocaleString("en-US")} rows/s`;

const { db, pool, schema } = await import("../../app/.server/db");
try {
  const { createSamplingEvent } = await import("../../app/.server/intake/events");
  const { intakeContext } = await import("../../app/.server/intake/context");
  const { parseCsvBytes } = await import("../../app/.server/intake/parse");
  const { validateTable } = await import("../../app/.server/intake/validate");
  const { autoMapColumns } = await import("../../app/.server/intake/kinds");
  const { commitUpload, receiveUpload, reviewUpload } = await import("../../app/.server/intake/uploads");

  // A trial big enough for 50,000 distinct samples: 10 treatments × 25 blocks × 4 depths × 5 events.
  const programId = randomUUID();
  const userId = randomUUID();
  await db.insert(schema.programs).values({ id: programId, name: "Bench Station", slug: scratch });
  await db.insert(schema.users).values({ id: userId, name: "Bench", email: `${scratch}@bench.invalid` });
  const [trial] = await db.insert(schema.trials).values({ programId, title: "Bench trial", blockCount: BLOCKS }).returning();
  const treatments = await db.insert(schema.treatments).values(Array.from({ length: TREATMENTS }, (_, i) => ({ trialId: trial.id, code: `T${i + 1}`, name: `Treatment ${i + 1}`, position: i }))).returning();
  const blocks = await db.insert(schema.blocks).values(Array.from({ length: BLOCKS }, (_, i) => ({ trialId: trial.id, number: i + 1 }))).returning();
  await db.insert(schema.plots).values(
    blocks.flatMap((b) => treatments.map((t, i) => ({ trialId: trial.id, blockId: b.id, treatmentId: t.id, plotNumber: b.number * 100 + i + 1, positionInBlock: i + 1 }))),
  );
  const events = [];
  for (let e = 0; e < EVENTS; e++) {
    events.push(await createSamplingEvent(trial.id, userId, { seasonLabel: `Season ${e + 1}`, eventDate: `20${30 + e}-05-01`, isBaseline: false, depths: DEPTHS, variables: ["loi"] }));
  }
  const samples = await db.select({ code: schema.samples.code }).from(schema.samples);
  const lines = ["sample_code,crucible_g,crucible_dry_soil_g,crucible_residue_g,ignition_c,ignition_hours,lab_id,notes"];
  samples.forEach((s, i) => {
    const crucible = 18 + (i % 600) / 100;
    const dry = 10 + (i % 97) / 100;
    const som = 2.5 + ((i * 7919) % 200) / 100;
    lines.push(`${s.code},${crucible.toFixed(3)},${(crucible + dry).toFixed(3)},${(crucible + dry * (1 - som / 100)).toFixed(3)},550,4,L${i},`);
  });
  const bytes = new TextEncoder().encode(lines.join("\n"));
  console.log(`file: ${samples.length.toLocaleString("en-US")} LOI rows, ${(bytes.length / 1024 / 1024).toFixed(1)} MB`);

  let t = process.hrtime.bigint();
  const table = parseCsvBytes(bytes, { decimalComma: false });
  const parseS = seconds(t);
  t = process.hrtime.bigint();
  const context = await intakeContext(trial.id, programId, "loi");
  const contextS = seconds(t);
  t = process.hrtime.bigint();
  const review = validateTable(table, autoMapColumns(context.kind, table.headers), false, context);
  const validateS = seconds(t);
  console.log(`parse (papaparse):       ${parseS.toFixed(2)} s`);
  console.log(`load trial context:      ${contextS.toFixed(2)} s`);
  console.log(`validate (zod + checks): ${validateS.toFixed(2)} s  (${review.counts.ok} ok, ${review.counts.warning} warnings, ${review.counts.error} errors)`);
  console.log(`parse + validate:        ${(parseS + contextS + validateS).toFixed(2)} s  → ${rate(table.rows.length, parseS + contextS + validateS)}`);

  t = process.hrtime.bigint();
  const { uploadId } = await receiveUpload({ trialId: trial.id, programId, actorId: userId, kind: "loi", filename: "bench.csv", contentType: "text/csv", bytes, decimalComma: false });
  const receiveS = seconds(t);
  t = process.hrtime.bigint();
  await reviewUpload(trial.id, programId, uploadId);
  const reviewS = seconds(t);
  t = process.hrtime.bigint();
  const committed = await commitUpload(trial.id, programId, userId, uploadId, { confirmWarnings: true });
  const commitS = seconds(t);
  console.log("");
  console.log("As the app runs it (upload → review page → commit):");
  console.log(`receive (store bytes + SHA-256, read as CSV): ${receiveS.toFixed(2)} s`);
  console.log(`review (parse + validate the stored file):    ${reviewS.toFixed(2)} s → ${rate(committed.rows, reviewS)}`);
  console.log(`commit (lock, reuse the review, INSERT ${committed.rows.toLocaleString("en-US")} rows, 10,000 per statement): ${commitS.toFixed(2)} s → ${rate(committed.rows, commitS)}`);
  console.log(`total: ${(receiveS + reviewS + commitS).toFixed(2)} s (target: parse + validate + commit < 5 s on 2 cores)`);

  // A commit that finds no review to reuse (another server, or the data changed) checks everything again.
  await db.delete(schema.measurements);
  await db.update(schema.uploads).set({ status: "received" });
  await db.update(schema.trials).set({ dataVersion: 1000 });
  t = process.hrtime.bigint();
  await commitUpload(trial.id, programId, userId, uploadId, { confirmWarnings: true });
  const coldS = seconds(t);
  console.log(`commit without a reusable review (parse + validate + INSERT inside the transaction): ${coldS.toFixed(2)} s → ${rate(committed.rows, coldS)}`);
} finally {
  await pool.end();
  await admin.query(`drop database if exists "${scratch}" with (force)`);
  await admin.end();
  if (stopCluster) execFileSync("bash", ["scripts/pg.sh", "stop", "bench", "54349"], { stdio: "inherit" });
}
