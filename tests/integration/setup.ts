// Runs before each integration test file: a fresh database of its own and the SMTP fake's
// settings. Modules that read DATABASE_URL are imported by the test file after this.
import { afterAll } from "vitest";
import { createTestDatabase, dropTestDatabase } from "../support/databases";

const database = await createTestDatabase("t");
process.env.DATABASE_URL = database.url;
process.env.TILTHMARK_DEMO = "1";
process.env.TILTHMARK_BASE_URL = "http://127.0.0.1:3999";

afterAll(async () => {
  const { pool } = await import("~/.server/db");
  await pool.end();
  await dropTestDatabase(database.name);
});
