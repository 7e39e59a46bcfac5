// Tilthmark's production server: `node server.js [build/server/index.js]`.
// One worker process per CPU (node:cluster; WEB_CONCURRENCY sets the count), each serving the
// built client files and the React Router app through Express. HOST unset listens on every
// interface; PORT defaults to 3000.
// SIGTERM or SIGINT: every worker stops accepting connections, finishes the requests in flight
// and exits; the primary exits once all workers have (status 0 when they all stopped cleanly).
import cluster from "node:cluster";
import { readdirSync } from "node:fs";
import { availableParallelism } from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { RateLimiterClusterMaster } from "rate-limiter-flexible";

process.env.NODE_ENV ??= "production";
const serverBuild = path.resolve(process.argv[2] ?? path.join(process.env.TILTHMARK_BUILD_DIR ?? "build", "server", "index.js"));
const clientDir = path.join(path.dirname(serverBuild), "..", "client");
const workerCount = Math.max(1, Number(process.env.WEB_CONCURRENCY) || availableParallelism());
const host = process.env.HOST || undefined;
const port = Number(process.env.PORT ?? 3000);
const addressOf = (listening) => `http://${host ?? "localhost"}:${listening.port}`;
/** Connections still open this long after a stop signal are cut, so one stuck client cannot hold a worker. */
const DRAIN_MS = 10_000;

if (cluster.isPrimary && workerCount > 1) runPrimary();
else await runWorker();

function runPrimary() {
  let stopping = false;
  let listening = 0;
  const crashes = [];
  cluster.on("listening", (_worker, listeningOn) => {
    if (++listening === workerCount) console.log(`[server] Tilthmark on ${addressOf(listeningOn)} (${workerCount} workers)`);
  });
  cluster.on("exit", (worker, code, signal) => {
    if (stopping) {
      if (code !== 0) process.exitCode = 1;
      return;
    }
    // A worker that died of an uncaught error is replaced; workers that keep dying stop the server.
    console.error(`[server] worker ${worker.process.pid} exited (${signal ?? `status ${code}`})`);
    const now = Date.now();
    crashes.push(now);
    while (crashes[0] < now - 60_000) crashes.shift();
    if (crashes.length <= 3 * workerCount) return void cluster.fork();
    console.error("[server] workers keep exiting; stopping");
    process.exitCode = 1;
    stop();
  });
  const stop = () => {
    if (stopping) return;
    stopping = true;
    for (const worker of Object.values(cluster.workers)) worker.process.kill("SIGTERM");
  };
  // A terminal's Ctrl-C reaches the workers too; each stops once. The primary exits after the last worker.
  for (const signal of ["SIGTERM", "SIGINT"]) process.on(signal, stop);
  // The workers' rate limits (app/.server/rate-limit.ts) count here, so they hold for the whole server.
  new RateLimiterClusterMaster();
  for (let i = 0; i < workerCount; i++) cluster.fork();
}

async function runWorker() {
  let stopping = false;
  let stop = () => process.exit(0); // nothing is in flight before the server listens
  for (const signal of ["SIGTERM", "SIGINT"]) process.on(signal, () => stop());
  const [{ default: express }, { default: compression }, { createRequestHandler }, build] = await Promise.all([
    import("express"),
    import("compression"),
    import("@react-router/express"),
    import(pathToFileURL(serverBuild).href),
  ]);

  const app = express();
  app.disable("x-powered-by");
  // Once stopping, every answer closes its connection, so keep-alive clients let go after it.
  app.use((_req, res, next) => {
    if (stopping) res.setHeader("Connection", "close");
    next();
  });
  app.use(compression());
  // Only paths under one of the client folder's entries look at the disk; app routes go straight to React Router.
  // Hashed bundles never change; the other files (favicon, copies of public/) are rechecked hourly.
  const clientEntries = new Set(readdirSync(clientDir));
  const assets = express.static(clientDir, { immutable: true, maxAge: "1y" });
  const files = express.static(clientDir, { maxAge: "1h" });
  app.use((req, res, next) => {
    const entry = req.path.split("/")[1];
    if (entry === "assets") return assets(req, res, next);
    if (clientEntries.has(entry)) return files(req, res, next);
    next();
  });
  // No access log here: the app writes one line per request itself (app/.server/http-guard.ts).
  app.all("*", createRequestHandler({ build, mode: process.env.NODE_ENV }));

  const server = host ? app.listen(port, host) : app.listen(port);
  if (!cluster.isWorker) server.once("listening", () => console.log(`[server] Tilthmark on ${addressOf(server.address())}`));

  stop = () => {
    if (stopping) return;
    stopping = true;
    // Stop accepting and wait for open connections; idle keep-alive ones are closed now and as they
    // fall idle. The process then exits by itself (idle database connections do not hold it).
    server.close((error) => {
      if (error) console.error("[server]", error.message);
      if (cluster.isWorker) process.disconnect();
    });
    const idle = setInterval(() => server.closeIdleConnections(), 100).unref();
    setTimeout(() => {
      clearInterval(idle);
      server.closeAllConnections();
    }, DRAIN_MS).unref();
  };
}
