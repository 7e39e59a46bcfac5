// npm run bench:http — the production server (server.js) on loopback against a freshly seeded
// database: signed-in clients load the home, trial, results and chart routes of the demo trial.
// Two phases, each against a freshly started server: 50 clients for 20 s (issue #6's figure;
// target: no errors, p95 < 100 ms for cached results), then 100 clients for 30 s (issue #8's;
// target: no errors). Before each timed run, every path is read a few times (results cached) and
// the same load runs for BENCH_WARMUP_S seconds (default 5) uncounted. Each phase prints p50/p95/p99
// latency (overall and per route), requests per second, errors, CPU time per request of the
// server and of PostgreSQL, and the memory of all the server's processes before and after.
// Asserts nothing.
//
// BENCH_CONNECTIONS and BENCH_DURATION_S run one phase of that size instead. BENCH_NODE_ARGS adds
// flags to the server's node (e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof"); WEB_CONCURRENCY sets
// its number of workers.
//
// Uses DATABASE_URL's server when set (a new database is created beside it and dropped after);
// otherwise starts its own cluster (scripts/pg.sh, name "bench", port 54359). Builds first when
// the build directory (TILTHMARK_BUILD_DIR, default build/) has no server bundle.
import autocannon from "autocannon";
import { type ChildProcess, execFileSync, spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, readdirSync, readFileSync } from "node:fs";
import { availableParallelism, loadavg } from "node:os";
import pg from "pg";
import { quantile } from "simple-statistics";
import { DEMO_PASSWORD } from "../../datasets/demo/scenario";

type Phase = { connections: number; durationS: number; target: string };
const PHASES: Phase[] =
  process.env.BENCH_CONNECTIONS || process.env.BENCH_DURATION_S
    ? [{ connections: Number(process.env.BENCH_CONNECTIONS ?? 50), durationS: Number(process.env.BENCH_DURATION_S ?? 20), target: "custom run" }]
    : [
        { connections: 50, durationS: 20, target: "issue #6: no errors, p95 < 100 ms for cached results" },
        { connections: 100, durationS: 30, target: "issue #8: no errors; p95 and memory reported" },
      ];
const PORT = Number(process.env.TILTHMARK_BENCH_PORT ?? 3190);
const PG_NAME = process.env.TILTHMARK_BENCH_PG_NAME ?? "bench";
const PG_PORT = process.env.TILTHMARK_BENCH_PG_PORT ?? "54359";
const BUILD_DIR = process.env.TILTHMARK_BUILD_DIR ?? "build";
const NODE_ARGS = (process.env.BENCH_NODE_ARGS ?? "").split(/\s+/).filter(Boolean);
const WARMUP_S = Number(process.env.BENCH_WARMUP_S ?? 5);
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

/** A process and all its descendants (the server's workers), from /proc (Linux). */
function processTree(rootPid: number): number[] {
  const parents = new Map<number, number>();
  for (const entry of readdirSync("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      parents.set(Number(entry), procStat(Number(entry)).parent);
    } catch {
      /* the process ended meanwhile */
    }
  }
  const tree = new Set([rootPid]);
  for (let grew = true; grew; ) {
    grew = false;
    for (const [pid, parent] of parents) if (tree.has(parent) && !tree.has(pid)) (tree.add(pid), (grew = true));
  }
  return [...tree];
}

const CLOCK_TICKS = 100; // USER_HZ on Linux

/** Parent and CPU time used so far (user + system, ms) of a process. */
function procStat(pid: number): { parent: number; cpuMs: number } {
  // The command name (field 2) may hold spaces: split after its closing parenthesis.
  const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
  const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
  return { parent: Number(fields[1]), cpuMs: ((Number(fields[11]) + Number(fields[12])) * 1000) / CLOCK_TICKS };
}

/** Resident memory in MB of the server and its workers. */
function serverRssMb(rootPid: number): number {
  let kb = 0;
  for (const pid of processTree(rootPid)) {
    try {
      const line = readFileSync(`/proc/${pid}/status`, "utf8").split("\n").find((l) => l.startsWith("VmRSS:"));
      kb += line ? Number(line.replace(/\D+/g, "")) : 0;
    } catch {
      /* the process ended meanwhile */
    }
  }
  return kb / 1024;
}

/**
 * CPU time spent by the server's processes and by the PostgreSQL backends serving the bench
 * database: on a machine others use too, CPU per request says more than latency does.
 */
function cpuMeter(serverPid: number, admin: pg.Client, database: string) {
  const used = (pids: number[]) => pids.reduce((sum, pid) => {
    try {
      return sum + procStat(pid).cpuMs;
    } catch {
      return sum;
    }
  }, 0);
  const backends = async () =>
    (await admin.query<{ pid: number }>("select pid from pg_stat_activity where datname = $1", [database])).rows.map((r) => r.pid);
  // A backend may close during the run (the pool lets idle connections go): keep its last reading.
  const pgStart = new Map<number, number>();
  const pgLast = new Map<number, number>();
  let serverStart = 0;
  const sample = async () => {
    for (const pid of await backends()) {
      try {
        pgLast.set(pid, procStat(pid).cpuMs);
      } catch {
        /* closed meanwhile */
      }
    }
  };
  return {
    async start() {
      serverStart = used(processTree(serverPid));
      await sample();
      for (const [pid, ms] of pgLast) pgStart.set(pid, ms);
    },
    sample,
    async stop(requests: number) {
      await sample();
      const serverMs = used(processTree(serverPid)) - serverStart;
      const pgMs = [...pgLast].reduce((sum, [pid, ms]) => sum + ms - (pgStart.get(pid) ?? 0), 0);
      return { serverMsPerRequest: serverMs / requests, pgMsPerRequest: pgMs / requests };
    },
  };
}

const ms = (v: number) => `${v.toFixed(1)} ms`;
const pct = (values: number[], p: number) => (values.length ? quantile(values, p) : Number.NaN);
const loadAverage = () => loadavg().map((l) => l.toFixed(2)).join(" ");

async function startServer(env: NodeJS.ProcessEnv): Promise<ChildProcess> {
  const server = spawn(process.execPath, [...NODE_ARGS, "server.js", `${BUILD_DIR}/server/index.js`], { env, stdio: ["ignore", "ignore", "inherit"] });
  await waitForHealth(30_000);
  return server;
}

async function stopServer(server: ChildProcess) {
  if (server.exitCode !== null || server.signalCode !== null) return;
  const exited = new Promise((r) => server.once("exit", r));
  server.kill("SIGTERM");
  await Promise.race([exited, new Promise((r) => setTimeout(r, 10_000))]);
  if (server.exitCode === null && server.signalCode === null) {
    console.error("[bench] the server did not stop within 10 s of SIGTERM; killing it");
    server.kill("SIGKILL");
  }
}

type PhaseResult = Phase & {
  requests: number;
  p50: number;
  p95: number;
  p99: number;
  errors: number;
  beforeMb: number;
  afterMb: number;
  serverMsPerRequest: number;
  pgMsPerRequest: number;
  load: string;
};

type Setup = { env: NodeJS.ProcessEnv; admin: pg.Client; database: string; cookies: string[]; paths: string[]; trialId: string };

/**
 * `connections` clients, each with its own session, walking `paths` in order without pausing for
 * `durationS` seconds; `onResponse` hears every answer with the index of the path it answers.
 */
function load(connections: number, durationS: number, cookies: string[], paths: string[], onResponse: (path: number, status: number, ms: number) => void) {
  let nextCookie = 0;
  return new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(
      {
        url: BASE,
        connections,
        duration: durationS,
        requests: paths.map((path) => ({ method: "GET", path })),
        setupClient: (client) => {
          const cookie = cookies[nextCookie++ % cookies.length];
          client.setRequests(paths.map((path) => ({ method: "GET", path, headers: { cookie } })));
          // Each connection has one request in flight, so its n-th reply answers paths[n mod length].
          let n = 0;
          client.on("response", (statusCode, _bytes, responseTime) => onResponse(n++ % paths.length, statusCode, responseTime));
        },
      },
      (error, res) => (error ? reject(error) : resolve(res)),
    );
    autocannon.track(instance, { renderProgressBar: false, renderResultsTable: false, renderLatencyTable: false });
  });
}

async function runPhase(phase: Phase, { env, admin, database, cookies, paths, trialId }: Setup): Promise<PhaseResult> {
  const server = await startServer(env);
  try {
    const idleMb = serverRssMb(server.pid!);
    // Passes over every path first, so the timed run reads results cached for this data version (the
    // target's case); each worker keeps its own cache, and connections go to the workers in turn.
    for (let pass = 0; pass < 2 * availableParallelism(); pass++) {
      for (const path of paths) {
        const response = await fetch(`${BASE}${path}`, { headers: { cookie: cookies[0] } });
        if (!response.ok) throw new Error(`${path} answered HTTP ${response.status} before the run`);
        await response.arrayBuffer();
      }
    }
    // Then the same load for a few seconds, not counted: the server's code gets compiled and its
    // database connections opened, as on a server that has been running for a while.
    await load(phase.connections, WARMUP_S, cookies, paths, () => {});
    const beforeMb = serverRssMb(server.pid!);

    const latencies: number[] = [];
    const byPath = paths.map(() => [] as number[]);
    const statuses = new Map<number, number>();
    let peakMb = beforeMb;
    const cpu = cpuMeter(server.pid!, admin, database);
    await cpu.start();
    const sampler = setInterval(() => {
      peakMb = Math.max(peakMb, serverRssMb(server.pid!));
      void cpu.sample();
    }, 500);
    const result = await load(phase.connections, phase.durationS, cookies, paths, (path, status, ms) => {
      byPath[path].push(ms);
      latencies.push(ms);
      statuses.set(status, (statuses.get(status) ?? 0) + 1);
    });
    clearInterval(sampler);
    const { serverMsPerRequest, pgMsPerRequest } = await cpu.stop(latencies.length);
    const afterMb = serverRssMb(server.pid!);
    const loadAtEnd = loadAverage();

    const errors = [...statuses].filter(([s]) => s >= 400).reduce((n, [, c]) => n + c, 0) + result.errors + result.timeouts;
    const summary: PhaseResult = {
      ...phase,
      requests: latencies.length,
      p50: pct(latencies, 0.5),
      p95: pct(latencies, 0.95),
      p99: pct(latencies, 0.99),
      errors,
      beforeMb,
      afterMb,
      serverMsPerRequest,
      pgMsPerRequest,
      load: loadAtEnd,
    };
    console.log(`\nbench:http — ${phase.connections} signed-in clients × ${phase.durationS} s against ${BASE} (${BUILD_DIR}/, NODE_ENV=production; ${phase.target})`);
    console.log(`machine: ${availableParallelism()} CPUs, load ${loadAtEnd}`);
    console.log(`requests: ${latencies.length} in ${phase.durationS} s = ${(latencies.length / phase.durationS).toFixed(0)} req/s (autocannon mean ${result.requests.average.toFixed(0)} req/s)`);
    console.log(`latency: p50 ${ms(summary.p50)}  p95 ${ms(summary.p95)}  p99 ${ms(summary.p99)}  max ${ms(latencies.reduce((a, b) => Math.max(a, b), 0))}`);
    console.log(`errors: ${errors} (HTTP ≥ 400, ${result.errors} connection errors, ${result.timeouts} timeouts); statuses ${[...statuses].map(([s, c]) => `${s}×${c}`).join(", ")}`);
    console.log(`CPU per request: server ${ms(serverMsPerRequest)}, PostgreSQL ${ms(pgMsPerRequest)}`);
    console.log(`server memory (RSS, all processes): idle ${idleMb.toFixed(0)} MB, before the run ${beforeMb.toFixed(0)} MB, peak ${peakMb.toFixed(0)} MB, after ${afterMb.toFixed(0)} MB`);
    console.log("\nper route                                         n      p50      p95      p99");
    paths.forEach((path, i) => {
      const label = path.replace(trialId, ":trialId").replace(`?${SELECTION}`, "").padEnd(44).slice(0, 44);
      const v = byPath[i];
      console.log(`${label} ${String(v.length).padStart(6)} ${ms(pct(v, 0.5)).padStart(9)} ${ms(pct(v, 0.95)).padStart(9)} ${ms(pct(v, 0.99)).padStart(9)}`);
    });
    return summary;
  } finally {
    await stopServer(server);
  }
}

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
  const clients = Math.max(...PHASES.map((p) => p.connections));
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
      TILTHMARK_BUILD_DIR: BUILD_DIR,
      // Not demo mode: the server runs as deployed, with a secret of its own.
      BETTER_AUTH_SECRET: randomBytes(24).toString("hex"),
      // Every client signs in once; the per-address sign-in limit would otherwise refuse most of them.
      RATE_LIMIT_SIGN_IN: String(clients * 2),
    };
    run("npx", ["tsx", "scripts/migrate.ts"], env);
    run("npx", ["tsx", "scripts/seed.ts"], env);
    if (!existsSync(`${BUILD_DIR}/server/index.js`)) {
      console.log(`[bench] building into ${BUILD_DIR}/`);
      run("npx", ["react-router", "build"], env);
    }

    // Sessions live in the database, so the cookies stay good across the servers of every phase.
    server = await startServer(env);
    const cookies = await Promise.all(Array.from({ length: clients }, (_, i) => signIn(READERS[i % READERS.length])));
    const home = await (await fetch(`${BASE}/home`, { headers: { cookie: cookies[0] } })).text();
    await stopServer(server);
    const trialId = /\/trials\/([0-9a-f-]{36})/.exec(home)?.[1];
    if (!trialId) throw new Error("the demo trial is not linked from the home page");
    const paths = [
      "/home",
      `/trials/${trialId}`,
      `/trials/${trialId}/results?${SELECTION}`,
      ...CHARTS.map((c) => `/api/trials/${trialId}/charts/${c}?${SELECTION}`),
    ];

    const results: PhaseResult[] = [];
    await withClient(admin.toString(), async (client) => {
      for (const phase of PHASES) results.push(await runPhase(phase, { env, admin: client, database, cookies, paths, trialId }));
    });

    console.log("\nsummary         req/s   p50 ms   p95 ms   p99 ms errors  CPU ms/req server + PG  memory before → after  load (1/5/15 min)");
    for (const r of results) {
      const label = `${r.connections} × ${r.durationS} s`.padEnd(14);
      const cells = [(r.requests / r.durationS).toFixed(0), r.p50.toFixed(1), r.p95.toFixed(1), r.p99.toFixed(1), String(r.errors)].map((c, i) => c.padStart(i === 4 ? 6 : 8));
      const cpu = `${r.serverMsPerRequest.toFixed(1)} + ${r.pgMsPerRequest.toFixed(1)}`.padStart(24);
      console.log(`${label} ${cells.join(" ")} ${cpu}  ${`${r.beforeMb.toFixed(0)} → ${r.afterMb.toFixed(0)} MB`.padEnd(21)} ${r.load}`);
    }
  } finally {
    if (server) await stopServer(server);
    await withClient(admin.toString(), (c) => c.query(`drop database if exists "${database}" with (force)`));
    if (ownCluster) run("bash", ["scripts/pg.sh", "stop", PG_NAME, PG_PORT]);
  }
}

await main();
