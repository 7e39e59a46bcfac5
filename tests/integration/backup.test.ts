// db:backup and db:restore round-trip the demo data: every table, row counts and checksums.
import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import pg from "pg";
import { afterAll, beforeAll, expect, it } from "vitest";
import { seedDemo } from "~/.server/seed";
import { adminUrl, dropTestDatabase, urlFor } from "../support/databases";

const restored = `t_restore_${process.pid}`;

async function fingerprint(url: string): Promise<Record<string, { rows: number; md5: string | null }>> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    const tables = await client.query<{ table_name: string }>(
      "select table_name from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' order by 1",
    );
    const out: Record<string, { rows: number; md5: string | null }> = {};
    for (const { table_name } of tables.rows) {
      const r = await client.query<{ rows: string; md5: string | null }>(
        `select count(*) as rows, md5(string_agg(t::text, '|' order by t::text)) as md5 from "${table_name}" t`,
      );
      out[table_name] = { rows: Number(r.rows[0].rows), md5: r.rows[0].md5 };
    }
    return out;
  } finally {
    await client.end();
  }
}

beforeAll(async () => {
  await seedDemo();
  const admin = new pg.Client({ connectionString: adminUrl() });
  await admin.connect();
  await admin.query(`drop database if exists "${restored}" with (force)`);
  await admin.query(`create database "${restored}"`);
  await admin.end();
}, 120_000);

afterAll(async () => {
  await dropTestDatabase(restored);
});

it("restores every table of a backup into an empty database, row for row", async () => {
  const dir = mkdtempSync(join(tmpdir(), "tilthmark-backup-"));
  const source = process.env.DATABASE_URL!;
  const file = execFileSync("bash", ["scripts/db-backup.sh", dir], { env: { ...process.env, DATABASE_URL: source }, encoding: "utf8" }).trim();
  expect(file).toMatch(/tilthmark-\d{8}T\d{6}Z\.dump$/);

  execFileSync("bash", ["scripts/db-restore.sh", file], { env: { ...process.env, DATABASE_URL: urlFor(restored) }, stdio: "pipe" });
  const before = await fingerprint(source);
  const after = await fingerprint(urlFor(restored));
  expect(Object.keys(after).sort()).toEqual(Object.keys(before).sort());
  expect(after).toEqual(before);
  // The demo has uploads with their raw bytes; they must be among what came back.
  expect(after.upload.rows).toBeGreaterThan(0);
  expect(after.measurement.rows).toBeGreaterThan(0);

  // Restoring over live data is refused.
  const again = spawnSync("bash", ["scripts/db-restore.sh", file], { env: { ...process.env, DATABASE_URL: urlFor(restored) }, encoding: "utf8" });
  expect(again.status).toBe(3);
  expect(again.stderr).toContain("The target database is not empty");
}, 120_000);
