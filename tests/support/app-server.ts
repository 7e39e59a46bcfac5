// Starts the production build as a child process for browser and fault tests, and stops it the
// way an operator would (SIGTERM, then SIGKILL after a grace period).
import { type ChildProcess, spawn } from "node:child_process";

export interface AppServer {
  baseUrl: string;
  process: ChildProcess;
  /** SIGTERM, waits up to `graceMs` for the exit, then SIGKILL. Resolves with the exit code. */
  stop(graceMs?: number): Promise<number | null>;
}

export async function waitForHealth(url: string, timeoutMs: number): Promise<void> {
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

/** The app in demo mode on 127.0.0.1:port against databaseUrl, started from the build folder. */
export async function startAppServer(options: {
  port: number;
  databaseUrl: string;
  env?: Record<string, string>;
  /** Hears each line the server writes to stdout (its request log); the log is then on. */
  onLog?: (line: string) => void;
}): Promise<AppServer> {
  const baseUrl = `http://127.0.0.1:${options.port}`;
  const buildDir = process.env.TILTHMARK_BUILD_DIR ?? "build";
  const env = {
    ...process.env,
    DATABASE_URL: options.databaseUrl,
    TILTHMARK_DEMO: "1",
    NODE_ENV: "production",
    HOST: "127.0.0.1",
    PORT: String(options.port),
    TILTHMARK_BASE_URL: baseUrl,
    TILTHMARK_QUIET_LOGS: options.onLog ? "0" : "1",
    ...options.env,
  };
  // Node itself, not npx, so that stopping it stops the server and not only a wrapper.
  const child = spawn(process.execPath, ["server.js", `${buildDir}/server/index.js`], { env, stdio: ["ignore", options.onLog ? "pipe" : "ignore", "inherit"] });
  if (options.onLog && child.stdout) {
    const hear = options.onLog;
    let rest = "";
    child.stdout.setEncoding("utf8").on("data", (chunk: string) => {
      const lines = (rest + chunk).split("\n");
      rest = lines.pop() ?? "";
      for (const line of lines) hear(line);
    });
  }
  await waitForHealth(baseUrl, 30_000);
  return {
    baseUrl,
    process: child,
    async stop(graceMs = 10_000) {
      if (child.exitCode !== null) return child.exitCode;
      const exited = new Promise<number | null>((resolve) => child.once("exit", (code) => resolve(code)));
      child.kill("SIGTERM");
      const timer = setTimeout(() => child.kill("SIGKILL"), graceMs);
      const code = await exited;
      clearTimeout(timer);
      return code;
    },
  };
}
