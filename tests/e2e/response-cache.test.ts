// The response cache (app/.server/response-cache.ts) against the production server with one
// worker and its request log: a page read again is served from the cache with a fresh CSP nonce,
// and nothing stale is kept — a change committed by anyone (here straight into the database), a
// sign-out and a removed membership show within moments (as soon as the worker hears of them), and
// the reader's own write on their very next read.
// Own database (seeded), so the changes made here touch no other test.
import { execFileSync } from "node:child_process";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type AppServer, startAppServer } from "../support/app-server";
import { launchBrowser } from "../support/browser";
import { createTestDatabase, dropTestDatabase } from "../support/databases";
import { signInCookie } from "../support/routes";
import { DEMO_PASSWORD, demoTrial } from "../../datasets/demo/scenario";

const APP_PORT = Number(process.env.TILTHMARK_E2E_PORT ?? 3111) + 4;
let app: AppServer;
let database: { name: string; url: string };
let sql: pg.Client;
let trialId: string;
const log: { path: string; cache?: string; status: number }[] = [];

beforeAll(async () => {
  database = await createTestDatabase("cache");
  execFileSync("npx", ["tsx", "scripts/seed.ts"], { env: { ...process.env, DATABASE_URL: database.url, TILTHMARK_DEMO: "1" }, stdio: "ignore" });
  sql = new pg.Client({ connectionString: database.url });
  await sql.connect();
  trialId = (await sql.query<{ id: string }>("select id from trial where title = $1", [demoTrial.title])).rows[0].id;
  app = await startAppServer({
    port: APP_PORT,
    databaseUrl: database.url,
    // One worker, so a second read meets the first one's entry.
    env: { WEB_CONCURRENCY: "1", RATE_LIMIT_SIGN_IN: "500" },
    onLog: (line) => {
      if (line.startsWith("{")) log.push(JSON.parse(line));
    },
  });
}, 120_000);

afterAll(async () => {
  await app?.stop(5_000);
  await sql?.end();
  if (database) await dropTestDatabase(database.name);
});

const pause = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** GET as a browser with `cookie`; resolves with the answer and what the log says of it. */
async function read(path: string, cookie: string) {
  const before = log.length;
  const res = await fetch(`${app.baseUrl}${path}`, { headers: { cookie }, redirect: "manual" });
  const text = await res.text();
  const pathname = path.split("?")[0];
  const deadline = Date.now() + 2_000;
  while (!log.slice(before).some((l) => l.path === pathname) && Date.now() < deadline) await pause(10);
  const entry = log.slice(before).find((l) => l.path === pathname);
  return { res, text, cache: entry?.cache };
}

/**
 * Reads until the log shows a hit, so an entry is known to be in the cache (the first read also
 * starts the change feed); `stored` is the body of the read the entry was made from.
 */
async function cached(path: string, cookie: string) {
  let stored = "";
  for (let i = 0; i < 5; i++) {
    const r = await read(path, cookie);
    if (r.cache === "hit") return { ...r, stored };
    stored = r.text;
  }
  throw new Error(`${path} never came from the cache`);
}

/**
 * Reads until `ok` holds, for up to three seconds: a change committed elsewhere reaches each worker
 * as a notification, normally within a millisecond, later on a machine under heavy load.
 */
async function readUntil(path: string, cookie: string, ok: (r: Awaited<ReturnType<typeof read>>) => boolean) {
  const deadline = Date.now() + 3_000;
  let r = await read(path, cookie);
  while (!ok(r) && Date.now() < deadline) {
    await pause(50);
    r = await read(path, cookie);
  }
  return r;
}

const post = (path: string, cookie: string, form: Record<string, string>) =>
  fetch(`${app.baseUrl}${path}`, { method: "POST", body: new URLSearchParams(form), redirect: "manual", headers: { cookie, Origin: app.baseUrl } });

/**
 * Signed in as `email`, as the browser's cookie stands once the sign-in's recent-write window
 * (which skips the cache for a few seconds) has passed.
 */
async function session(email: string): Promise<string> {
  const cookie = await signInCookie(app.baseUrl, email, DEMO_PASSWORD);
  return cookie
    .split("; ")
    .filter((c) => !c.startsWith("tilthmark_wrote="))
    .join("; ");
}

const nonces = (html: string) => [...new Set([...html.matchAll(/nonce="([^"]+)"/g)].map((m) => m[1]))];

describe("response cache", () => {
  it("serves a page read again from the cache, with a nonce of its own", async () => {
    const cookie = await session("collaborator@cedarhollow.example");
    const path = `/trials/${trialId}/results?variable=som&depth=0-10`;
    const first = await cached(path, cookie);
    const second = await read(path, cookie);
    expect([first.res.status, second.res.status, second.cache]).toEqual([200, 200, "hit"]);
    // The page as stored, apart from the nonce; each answer's scripts carry the nonce its own policy names.
    const [stored] = nonces(first.stored);
    for (const answer of [first, second]) {
      const [nonce, ...others] = nonces(answer.text);
      expect(others).toEqual([]);
      expect(nonce).not.toBe(stored);
      expect(answer.res.headers.get("content-security-policy")).toContain(`'nonce-${nonce}'`);
      expect(answer.text.replaceAll(nonce, stored)).toBe(first.stored);
    }
    expect(nonces(first.text)).not.toEqual(nonces(second.text));
    // JSON routes too.
    const chart = `/api/trials/${trialId}/charts/season-means?variable=som&depth=0-10`;
    const json = await cached(chart, cookie);
    expect(json.text).toBe(json.stored);
    expect(json.res.headers.get("content-type")).toMatch(/^application\/json/);
  });

  it("serves a page from the cache that still runs in the browser: charts drawn, no policy errors", async () => {
    const cookie = await session("collaborator@cedarhollow.example");
    const path = `/trials/${trialId}/results?variable=som&depth=0-10`;
    await cached(path, cookie);
    const browser = await launchBrowser();
    try {
      const context = await browser.newContext();
      await context.addCookies(
        cookie.split("; ").map((pair) => {
          const at = pair.indexOf("=");
          return { name: pair.slice(0, at), value: pair.slice(at + 1), url: app.baseUrl };
        }),
      );
      const page = await context.newPage();
      const problems: string[] = [];
      page.on("console", (m) => m.type() === "error" && problems.push(m.text()));
      page.on("pageerror", (e) => problems.push(e.message));
      const before = log.length;
      await page.goto(`${app.baseUrl}${path}`);
      // Drawn in the browser from the chart routes (themselves cached), so the page's scripts ran.
      await expect.poll(() => page.locator('[data-chart="season-means.svg"] svg').count(), { timeout: 20_000 }).toBeGreaterThan(0);
      expect(log.slice(before).find((l) => l.path === path.split("?")[0])?.cache).toBe("hit");
      // A client-side move to another cached page and back (React Router's .data requests).
      await page.getByRole("navigation", { name: "Trial sections" }).getByRole("link", { name: "Overview" }).click();
      await page.waitForURL(`${app.baseUrl}/trials/${trialId}`);
      await page.goBack();
      await expect.poll(() => page.locator('[data-chart="season-means.svg"] svg').count(), { timeout: 20_000 }).toBeGreaterThan(0);
      expect(problems).toEqual([]);
    } finally {
      await browser.close();
    }
  });

  it("keeps each person's pages apart", async () => {
    const collaborator = await session("collaborator@cedarhollow.example");
    const technician = await session("technician@cedarhollow.example");
    expect((await cached("/home", collaborator)).text).toContain("Lena Ostrowski");
    const other = await cached("/home", technician);
    expect(other.text).toContain("Priya Nandakumar");
    expect(other.text).not.toContain("Lena Ostrowski");
  });

  it("shows a change committed by anyone on the next read", async () => {
    const cookie = await session("researcher@cedarhollow.example");
    const path = `/trials/${trialId}`;
    expect((await cached(path, cookie)).text).toContain(demoTrial.title);
    const renamed = `${demoTrial.title} (renamed by the cache test)`;
    await sql.query("update trial set title = $1 where id = $2", [renamed, trialId]);
    try {
      const after = await readUntil(path, cookie, (r) => r.text.includes(renamed));
      expect(after.text).toContain(renamed);
      expect(after.cache).toBe("miss");
    } finally {
      await sql.query("update trial set title = $1 where id = $2", [demoTrial.title, trialId]);
    }
  });

  it("stops serving a session's pages once it signs out, even to a copy of its cookie", async () => {
    const cookie = await session("collaborator@cedarhollow.example");
    await cached("/home", cookie);
    const out = await post("/sign-out", cookie, {});
    expect(out.status).toBe(302);
    const after = await readUntil("/home", cookie, (r) => r.res.status === 302);
    expect(after.res.status).toBe(302);
    expect(after.res.headers.get("location")).toMatch(/^\/sign-in/);
  });

  it("refuses a member removed from the program on the next read", async () => {
    const cookie = await session("technician@cedarhollow.example");
    const path = `/trials/${trialId}/results?variable=som&depth=0-10`;
    await cached(path, cookie);
    const { rows } = await sql.query("delete from member where user_id = (select id from \"user\" where email = $1) returning *", ["technician@cedarhollow.example"]);
    try {
      expect((await readUntil(path, cookie, (r) => r.res.status === 403)).res.status).toBe(403);
    } finally {
      await sql.query("insert into member (id, organization_id, user_id, role, created_at) values ($1, $2, $3, $4, $5)", [
        rows[0].id,
        rows[0].organization_id,
        rows[0].user_id,
        rows[0].role,
        rows[0].created_at,
      ]);
    }
  });

  it("lets whoever just wrote read past the cache, so they see their change", async () => {
    const cookie = await session("owner@cedarhollow.example");
    await cached("/home", cookie);
    const res = await post("/home", cookie, { name: "Cache Test Station" });
    expect(res.status).toBe(200);
    const wrote = res.headers.getSetCookie().find((c) => c.startsWith("tilthmark_wrote="));
    expect(wrote).toMatch(/Max-Age=10; Path=\/; HttpOnly; SameSite=Lax/);
    const after = await read("/home", `${cookie}; ${wrote!.split(";")[0]}`);
    expect(after.cache).toBeUndefined();
    expect(after.text).toContain("Cache Test Station");
    await sql.query("delete from organization where name = 'Cache Test Station'");
  });
});
