// Starts the production build against its own seeded database, in demo mode (so the SMTP
// fake and /dev/mailbox are on), for the browser journeys. Stops it afterwards.
import { type ChildProcess, execFileSync, spawn } from "node:child_process";
import type { TestProject } from "vitest/node";
import { createTestDatabase, dropTestDatabase } from "../support/databases";

const PORT = Number(process.env.TILTHMARK_E2E_PORT ?? 3111);
let server: ChildProcess | undefined;
let database: { name: string; url: string } | undefined;

declare module "vitest" {
  export interface ProvidedContext {
    baseUrl: string;
    databaseUrl: string;
  }
}

async function waitForHealth(url: string, timeoutMs: number) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    try {
      const res = await fetch(`${url}/healthz`);
      if (res.ok) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`the app did not answer at ${url} within ${timeoutMs} ms`);
}

export async function setup(project: TestProject) {
  database = await createTestDatabase("e2e");
  const env = {
    ...process.env,
    DATABASE_URL: database.url,
    TILTHMARK_DEMO: "1",
    NODE_ENV: "production",
    HOST: "127.0.0.1",
    PORT: String(PORT),
    TILTHMARK_BASE_URL: `http://127.0.0.1:${PORT}`,
    // Journeys sign the same demo people in many times; the limit itself is tested in integration.
    RATE_LIMIT_SIGN_IN: "500",
    TILTHMARK_QUIET_LOGS: "1",
  };
  execFileSync("npx", ["tsx", "scripts/seed.ts"], { env, stdio: "inherit" });
  // Node itself, not npx, so that stopping it stops the server and not only a wrapper.
  const buildDir = process.env.TILTHMARK_BUILD_DIR ?? "build";
  server = spawn(process.execPath, ["server.js", `${buildDir}/server/index.js`], {
    env,
    stdio: ["ignore", "ignore", "inherit"],
  });
  const baseUrl = `http://127.0.0.1:${PORT}`;
  await waitForHealth(baseUrl, 30_000);
  project.provide("baseUrl", baseUrl);
  project.provide("databaseUrl", database.url);
  return teardown;
}

async function teardown() {
  if (server && server.exitCode === null) {
    const exited = new Promise((r) => server!.once("exit", r));
    server.kill("SIGTERM");
    const stopped = await Promise.race([exited.then(() => true), new Promise((r) => setTimeout(() => r(false), 5000))]);
    if (!stopped) server.kill("SIGKILL");
  }
  if (database) await dropTestDatabase(database.name);
}
