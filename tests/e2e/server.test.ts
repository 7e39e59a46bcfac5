// server.js, the production entry, with two workers behind one port: built files served with their
// caching, sign-in limits counted for the whole server rather than per worker, and SIGTERM ending
// every process with status 0. Its own server on a port the system picks, against the browser
// tests' database.
import { type ChildProcess, spawn } from "node:child_process";
import { readdirSync, readFileSync } from "node:fs";
import { afterAll, beforeAll, expect, inject, it } from "vitest";

const BUILD_DIR = process.env.TILTHMARK_BUILD_DIR ?? "build";
const SIGN_IN_LIMIT = 4;

let server: ChildProcess;
let port: number;
const exited = () => new Promise<number | null>((resolve) => (server.exitCode !== null ? resolve(server.exitCode) : server.once("exit", resolve)));

/** Processes whose parent is `pid` (Linux /proc). */
function childrenOf(pid: number): number[] {
  return readdirSync("/proc")
    .filter((entry) => /^\d+$/.test(entry))
    .filter((entry) => {
      try {
        const stat = readFileSync(`/proc/${entry}/stat`, "utf8");
        return Number(stat.slice(stat.lastIndexOf(")") + 2).split(" ")[1]) === pid;
      } catch {
        return false;
      }
    })
    .map(Number);
}

/** A failed sign-in on a connection of its own, so that consecutive attempts go to different workers. */
async function failedSignIn(email: string): Promise<string> {
  const response = await fetch(`http://127.0.0.1:${port}/sign-in`, {
    method: "POST",
    body: new URLSearchParams({ email, password: "not-the-password" }),
    headers: { connection: "close" },
  });
  expect(response.status).toBe(400);
  return response.text();
}

beforeAll(async () => {
  server = spawn(process.execPath, ["server.js", `${BUILD_DIR}/server/index.js`], {
    env: {
      ...process.env,
      DATABASE_URL: inject("databaseUrl"),
      TILTHMARK_DEMO: "1",
      NODE_ENV: "production",
      HOST: "127.0.0.1",
      PORT: "0",
      WEB_CONCURRENCY: "2",
      RATE_LIMIT_SIGN_IN: String(SIGN_IN_LIMIT),
      TILTHMARK_QUIET_LOGS: "1",
    },
    stdio: ["ignore", "pipe", "inherit"],
  });
  // The primary says where it listens once every worker does.
  port = await new Promise<number>((resolve, reject) => {
    let output = "";
    server.stdout!.on("data", (chunk: Buffer) => {
      output += chunk.toString();
      const match = /Tilthmark on http:\/\/127\.0\.0\.1:(\d+) \(2 workers\)/.exec(output);
      if (match) resolve(Number(match[1]));
    });
    server.once("exit", (code) => reject(new Error(`server.js exited (status ${code}) before listening: ${output}`)));
  });
}, 60_000);

afterAll(() => {
  if (server.exitCode === null) server.kill("SIGKILL");
});

it("runs two workers behind one port and serves built files with their caching", async () => {
  expect(childrenOf(server.pid!)).toHaveLength(2);
  const asset = readdirSync(`${BUILD_DIR}/client/assets`).find((f) => f.endsWith(".js"))!;
  const bundle = await fetch(`http://127.0.0.1:${port}/assets/${asset}`);
  expect(bundle.status).toBe(200);
  expect(bundle.headers.get("cache-control")).toBe("public, max-age=31536000, immutable");
  const icon = await fetch(`http://127.0.0.1:${port}/favicon.svg`);
  expect(icon.status).toBe(200);
  expect(icon.headers.get("cache-control")).toBe("public, max-age=3600");
  // Everything else is the app's: its 404 page, and its pages with their security headers.
  const missing = await fetch(`http://127.0.0.1:${port}/assets/no-such-file.js`);
  expect(missing.status).toBe(404);
  expect(await missing.text()).toContain("Nothing here");
  const page = await fetch(`http://127.0.0.1:${port}/sign-in`);
  expect(page.status).toBe(200);
  expect(page.headers.get("x-frame-options")).toBe("DENY");
});

it("counts sign-in attempts for the whole server, not per worker", async () => {
  // Each attempt on a new connection: the primary hands connections to the workers in turn, so
  // with counters per worker neither would have reached the limit at the fifth attempt.
  for (let i = 0; i < SIGN_IN_LIMIT; i++) {
    expect(await failedSignIn("limit-check@uni.example")).toContain("That e-mail and password do not match an account.");
  }
  expect(await failedSignIn("limit-check@uni.example")).toMatch(/Too many attempts\. Please wait \d+ minutes? and try again\./);
});

it("stops every worker and the primary with status 0 on SIGTERM", async () => {
  // A request in flight during the stop is graceful-stop.test.ts's case.
  const workers = childrenOf(server.pid!);
  const exit = exited();
  server.kill("SIGTERM");
  expect(await exit).toBe(0);
  for (const pid of workers) expect(() => process.kill(pid, 0)).toThrow();
});
