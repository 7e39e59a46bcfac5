// Test databases: each test file (and the browser journeys) gets its own database, cloned from a
// migrated template, so no state is shared between files.
import { randomBytes } from "node:crypto";
import pg from "pg";

export const TEMPLATE_DB = "tilthmark_template";

export function adminUrl(): string {
  const url = process.env.TILTHMARK_TEST_ADMIN_URL;
  if (!url) throw new Error("TILTHMARK_TEST_ADMIN_URL is not set: run the tests with `npm test`.");
  return url;
}

export function urlFor(database: string): string {
  const url = new URL(adminUrl());
  url.pathname = `/${database}`;
  return url.toString();
}

async function withAdmin<T>(fn: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: adminUrl() });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}

/** Creates an empty, migrated database for one test file and returns its URL. */
export async function createTestDatabase(prefix = "t"): Promise<{ name: string; url: string }> {
  const name = `${prefix}_${randomBytes(6).toString("hex")}`;
  await withAdmin((c) => c.query(`create database "${name}" template "${TEMPLATE_DB}"`));
  return { name, url: urlFor(name) };
}

export async function dropTestDatabase(name: string) {
  await withAdmin((c) => c.query(`drop database if exists "${name}" with (force)`));
}
