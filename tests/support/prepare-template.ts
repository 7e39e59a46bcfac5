// Recreates the migrated template database every test database is cloned from.
import { execFileSync } from "node:child_process";
import pg from "pg";
import { TEMPLATE_DB, adminUrl, urlFor } from "./databases";

const admin = new pg.Client({ connectionString: adminUrl() });
await admin.connect();
// Left-over test databases from an interrupted run.
const stale = await admin.query<{ datname: string }>(
  "select datname from pg_database where datname ~ '^(t|e2e)_[0-9a-f]{12}$'",
);
for (const { datname } of stale.rows) await admin.query(`drop database "${datname}" with (force)`);
await admin.query(`drop database if exists "${TEMPLATE_DB}" with (force)`);
await admin.query(`create database "${TEMPLATE_DB}"`);
await admin.end();

execFileSync("npx", ["tsx", "scripts/migrate.ts"], {
  stdio: "inherit",
  env: { ...process.env, DATABASE_URL: urlFor(TEMPLATE_DB) },
});
