// npm run bench:http — the production build on loopback against a freshly seeded database: 50
// signed-in clients load the home, trial, results and chart routes of the demo trial for 20 s.
// Prints p50/p95/p99 latency (overall and per route), requests per second, errors and the
// server's memory. Asserts nothing (target: no errors, p95 < 100 ms for cached results).
//
// Uses DATABASE_URL's server when set (a new database is created beside it and dropped after);
// otherwise starts its own cluster (scripts/pg.sh, name "bench", port 54359). Builds first when
// the build directory (TILTHMARK_BUILD_DIR, default build/) has no server bundle.
import autocannon from "autocannon";
import { type ChildProcess, execFileSync, spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, readFileSync } from "node:fs";
import { availableParallelism, loadavg } from "node:os";
import pg from "pg";
import { quantile } from "simple-statistics";
import { DEMO_PASSWORD } from "../../datasets/demo/scenario";

const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 50);
const DURATION_S = Number(process.env.BENCH_DURATION_S ?? 20);
const PORT = Number(process.env.TILTHMARK_BENCH_PORT ?? 3190);
const PG_NAME = process.env.TILTHMARK_BENCH_PG_NAME ?? "bench";
const PG_PORT = process.env.TILTHMARK_BENCH_PG_PORT ?? "54359";
const BUILD_DIR = process.env.TILTHMARK_BUILD_DIR ?? "build";
const BASE = `http://127.0.0.1:${PORT}`;
/** Demo roles that may read results; clients are spread over them. */
const READERS = ["owner", "researcher", "technician", "collaborator"].map((r) => `${r}@cedarhollow.example`);
const SELECTION = "variable=som&depth=0-10";
const CHARTS = ["season-means", "plot-values", "plot-map", "depth-profile", "stocks", "diagnostics", "contrasts"];

const run = (cmd: string, args: string[], env: NodeJS.ProcessEnv = process.env) => execFileSync(cmd, args, { env, stdio: ["ignore", "ignore", "inherit"] });

async function withClient<T>(url: string, fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}

async function waitForHealth(timeoutMs: number) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    try {
      if ((await fetch(`${BASE}/healthz`)).ok) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`the app did not answer at ${BASE} within ${timeoutMs} ms`);
}

async function signIn(email: string): Promise<string> {
  const response = await fetch(`${BASE}/sign-in`, {
    method: "POST",
    body: new URLSearchParams({ email, password: DEMO_PASSWORD, redirectTo: "/home" }),
    redirect: "manual",
  });
  const cookies = response.headers.getSetCookie().map((c) => c.split(";")[0]);
  if (response.status !== 302 || cookies.length === 0) throw new Error(`could not sign in as ${email} (HTTP ${response.status})`);
  return cookies.join("; ");
}

/** Resident memory of a process in MB, from /proc (Linux). */
function rssMb(pid: number): number {
  const line = readFileSync(`/proc/${pid}/status`, "utf8").split("\n").find((l) => l.startsWith("VmRSS:"));
  return line ? Number(line.replace(/\D+/g, "")) / 1024 : Number.NaN;
}

const ms = (v: number) => `${v.toFixed(1)} ms`;

async function main() {
  let ownCluster = false;
  let baseUrl = process.env.DATABASE_URL;
  if (!baseUrl) {
    run("bash", ["scripts/pg.sh", "start", PG_NAME, PG_PORT]);
    ownCluster = true;
    baseUrl = execFileSync("bash", ["scripts/pg.sh", "url", PG_NAME, PG_PORT], { encoding: "utf8" }).trim();
  }
  const admin = new URL(baseUrl);
  admin.pathname = "/postgres";
  const database = `bench_${randomBytes(5).toString("hex")}`;
  const dbUrl = new URL(baseUrl);
  dbUrl.pathname = `/${database}`;
  let server: ChildProcess | undefined;
  try {
    await withClient(admin.toString(), (c) => c.query(`create database "${database}"`));
    const env = {
      ...process.env,
      DATABASE_URL: dbUrl.toString(),
      NODE_ENV: "production",
      HOST: "127.0.0.1",
      PORT: String(PORT),
      TILTHMARK_BASE_URL: BASE,
      // Not demo mode: the server runs as deployed, with a secret of its own.
      BETTER_AUTH_SECRET: randomBytes(24).toString("hex"),
      // Every client signs in once; the per-address sign-in limit would otherwise refuse most of them.
      RATE_LIMIT_SIGN_IN: String(CONNECTIONS * 2),
    };
    run("npx", ["tsx", "scripts/migrate.ts"], env);
    run("npx", ["tsx", "scripts/seed.ts"], env);
    if (!existsSync(`${BUILD_DIR}/server/index.js`)) {
      console.log(`[bench] building into ${BUILD_DIR}/`);
      run("npx", ["react-router", "build"], env);
    }
    server = spawn(process.execPath, ["node_modules/@react-router/serve/bin.js", `${BUILD_DIR}/server/index.js`], { env, stdio: ["ignore", "ignore", "inherit"] });
    await waitForHealth(30_000);
    const idleMb = rssMb(server.pid!);

    const cookies = await Promise.all(Array.from({ length: CONNECTIONS }, (_, i) => signIn(READERS[i % READERS.length])));
    const home = await (await fetch(`${BASE}/home`, { headers: { cookie: cookies[0] } })).text();
    const trialId = /\/trials\/([0-9a-f-]{36})/.exec(home)?.[1];
    if (!trialId) throw new Error("the demo trial is not linked from the home page");
    const paths = [
      "/home",
      `/trials/${trialId}`,
      `/trials/${trialId}/results?${SELECTION}`,
      ...CHARTS.map((c) => `/api/trials/${trialId}/charts/${c}?${SELECTION}`),
    ];
    // One pass first, so the timed run reads results cached for this data version (the target's case).
    for (const path of paths) {
      const response = await fetch(`${BASE}${path}`, { headers: { cookie: cookies[0] } });
      if (!response.ok) throw new Error(`${path} answered HTTP ${response.status} before the run`);
      await response.arrayBuffer();
    }
    const warmMb = rssMb(server.pid!);

    const latencies: number[] = [];
    const byPath = paths.map(() => [] as number[]);
    const statuses = new Map<number, number>();
    let peakMb = warmMb;
    const sampler = setInterval(() => (peakMb = Math.max(peakMb, rssMb(server!.pid!))), 250);
    let nextCookie = 0;
    const result = await new Promise<autocannon.Result>((resolve, reject) => {
      const instance = autocannon(
        {
          url: BASE,
          connections: CONNECTIONS,
          duration: DURATION_S,
          requests: paths.map((path) => ({ method: "GET", path })),
          setupClient: (client) => {
            const cookie = cookies[nextCookie++ % cookies.length];
            client.setRequests(paths.map((path) => ({ method: "GET", path, headers: { cookie } })));
            // Each connection walks the paths in order with one request in flight, so its n-th reply answers paths[n mod length].
            let n = 0;
            client.on("response", (statusCode, _bytes, responseTime) => {
              byPath[n++ % paths.length].push(responseTime);
              latencies.push(responseTime);
              statuses.set(statusCode, (statuses.get(statusCode) ?? 0) + 1);
            });
          },
        },
        (error, res) => (error ? reject(error) : resolve(res)),
      );
      autocannon.track(instance, { renderProgressBar: false, renderResultsTable: false, renderLatencyTable: false });
    });
    clearInterval(sampler);

    const pct = (values: number[], p: number) => (values.length ? quantile(values, p) : Number.NaN);
    const errors = [...statuses].filter(([s]) => s >= 400).reduce((n, [, c]) => n + c, 0);
    console.log(`\nbench:http — ${CONNECTIONS} signed-in clients × ${DURATION_S} s against ${BASE} (${BUILD_DIR}/, NODE_ENV=production)`);
    console.log(`machine: ${availableParallelism()} CPUs, load ${loadavg().map((l) => l.toFixed(2)).join(" ")}`);
    console.log(`requests: ${latencies.length} in ${DURATION_S} s = ${(latencies.length / DURATION_S).toFixed(0)} req/s (autocannon mean ${result.requests.average.toFixed(0)} req/s)`);
    console.log(`latency: p50 ${ms(pct(latencies, 0.5))}  p95 ${ms(pct(latencies, 0.95))}  p99 ${ms(pct(latencies, 0.99))}  max ${ms(Math.max(...latencies))}`);
    console.log(`errors: ${errors} HTTP ≥ 400, ${result.errors} connection errors, ${result.timeouts} timeouts; statuses ${[...statuses].map(([s, c]) => `${s}×${c}`).join(", ")}`);
    console.log(`server memory (RSS): idle ${idleMb.toFixed(0)} MB, after warm-up ${warmMb.toFixed(0)} MB, peak ${peakMb.toFixed(0)} MB, end ${rssMb(server.pid!).toFixed(0)} MB`);
    console.log("\nper route              n      p50      p95      p99");
    paths.forEach((path, i) => {
      const label = path.replace(trialId, ":trialId").replace(`?${SELECTION}`, "").padEnd(44).slice(0, 44);
      const v = byPath[i];
      console.log(`${label} ${String(v.length).padStart(6)} ${ms(pct(v, 0.5)).padStart(9)} ${ms(pct(v, 0.95)).padStart(9)} ${ms(pct(v, 0.99)).padStart(9)}`);
    });
  } finally {
    if (server && server.exitCode === null) {
      const exited = new Promise((r) => server!.once("exit", r));
      server.kill("SIGTERM");
      await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))]);
      if (server.exitCode === null) server.kill("SIGKILL");
    }
    await withClient(admin.toString(), (c) => c.query(`drop database if exists "${database}" with (force)`));
    if (ownCluster) run("bash", ["scripts/pg.sh", "stop", PG_NAME, PG_PORT]);
  }
}

await main();
