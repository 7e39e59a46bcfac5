// PostgreSQL restarted under a running app: while it is down, pages answer with the 503 page,
// JSON routes with a 503 JSON error and /healthz says the database is unreachable; once it is back
// the same server (never restarted) answers normally again, with the same session. Runs its own
// cluster and app server so that stopping the database touches no other test.
import { execFileSync } from "node:child_process";
import { afterAll, beforeAll, expect, it } from "vitest";
import { type AppServer, startAppServer } from "../support/app-server";
import { signInCookie } from "../support/routes";
import { DEMO_PASSWORD, demoTrial } from "../../datasets/demo/scenario";

const PG_NAME = `restart-${process.env.TILTHMARK_E2E_PORT ?? "3111"}`;
const PG_PORT = String(Number(process.env.TILTHMARK_TEST_PG_PORT ?? 54339) + 1);
const APP_PORT = Number(process.env.TILTHMARK_E2E_PORT ?? 3111) + 2;

const pg = (command: "start" | "stop" | "url") => execFileSync("bash", ["scripts/pg.sh", command, PG_NAME, PG_PORT], { encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] }).trim();

let app: AppServer | undefined;
let databaseUrl: string;

beforeAll(async () => {
  pg("start");
  databaseUrl = pg("url");
  const env = { ...process.env, DATABASE_URL: databaseUrl };
  execFileSync("npx", ["tsx", "scripts/migrate.ts"], { env, stdio: "ignore" });
  execFileSync("npx", ["tsx", "scripts/seed.ts", "--if-empty"], { env, stdio: "ignore" });
  app = await startAppServer({ port: APP_PORT, databaseUrl });
}, 120_000);

afterAll(async () => {
  await app?.stop();
  pg("stop");
});

const get = (path: string, cookie: string) => fetch(`${app!.baseUrl}${path}`, { headers: { cookie }, redirect: "manual" });

it("answers 503 while PostgreSQL is down and recovers by itself when it is back", async () => {
  const cookie = await signInCookie(app!.baseUrl, "researcher@cedarhollow.example", DEMO_PASSWORD);
  const home = await get("/home", cookie);
  expect(home.status).toBe(200);
  const trialPath = (await home.text()).match(/href="(\/trials\/[0-9a-f-]{36})"/)?.[1];
  expect(trialPath).toBeTruthy();

  pg("stop");
  try {
    const page = await get(trialPath!, cookie);
    expect(page.status).toBe(503);
    expect(page.headers.get("retry-after")).toBe("30");
    expect(await page.text()).toContain("can't reach its database");
    const json = await get(`/api${trialPath}/results?variable=som&depth=0-10`, cookie);
    expect(json.status).toBe(503);
    expect(await json.json()).toEqual({ error: "The database is unavailable; try again shortly." });
    const health = await fetch(`${app!.baseUrl}/healthz`);
    expect(health.status).toBe(503);
    expect(await health.json()).toEqual({ status: "degraded", database: "unreachable" });
    const write = await fetch(`${app!.baseUrl}${trialPath}/sampling`, {
      method: "POST",
      body: new URLSearchParams({ seasonLabel: "2031 spring" }),
      headers: { cookie, Origin: app!.baseUrl },
      redirect: "manual",
    });
    expect(write.status).toBe(503);
    expect(app!.process.exitCode).toBeNull(); // still running
  } finally {
    pg("start");
  }

  // Back without restarting the app: the pool reconnects on the next request.
  await expect.poll(async () => (await fetch(`${app!.baseUrl}/healthz`)).status, { timeout: 30_000, interval: 250 }).toBe(200);
  const again = await get(trialPath!, cookie);
  expect(again.status).toBe(200);
  expect(await again.text()).toContain(demoTrial.title);
});
