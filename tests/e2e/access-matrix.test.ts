// Every route in app/routes.ts, read (GET) and posted to (an empty form) as each demo role, as the
// owner of another program and signed out, against the access declared in app/route-access.ts. A
// route without a declared access fails here, and so does a route that answers a post without a
// declared action, so a new route cannot slip in unguarded. Nothing the posts reach may change.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { roleCan } from "~/permissions";
import { ACTION_ACCESS, ROUTE_ACCESS, type RouteAccess } from "~/route-access";
import { type DemoRoutes, demoRoutes, PRINCIPALS, type Principal, routePatterns } from "../support/routes";

const baseUrl = inject("baseUrl");
let demo: DemoRoutes;
let cookies: Record<Principal, string>;
let checksumsBefore: Record<string, string>;

beforeAll(async () => {
  demo = await demoRoutes(baseUrl, inject("databaseUrl"));
  cookies = await demo.signInAll();
});

afterAll(async () => {
  await demo?.close();
});

/** Whether a signed-in principal passes the access; the demo owner is the install's administrator. */
function allowed(access: RouteAccess, who: Principal): boolean {
  if (access.kind === "permission") return who !== "outsider" && roleCan(who, access.permission);
  if (access.kind === "admin") return who === "owner";
  return true; // public, signed-in, demo-only, and the demo's public brief are open to everyone signed in
}

const passed = (status: number) => status < 500 && status !== 401 && status !== 403;

describe("access matrix: reading", () => {
  it("has a declared access for every route, and no stale entries", () => {
    expect(routePatterns.filter((p) => !(p in ROUTE_ACCESS))).toEqual([]);
    expect(Object.keys(ROUTE_ACCESS).filter((p) => !routePatterns.includes(p))).toEqual([]);
    expect(Object.keys(ACTION_ACCESS).filter((p) => !routePatterns.includes(p))).toEqual([]);
  });

  it.each(routePatterns.filter((p) => p in ROUTE_ACCESS))("GET %s", async (pattern) => {
    const access = ROUTE_ACCESS[pattern];
    const outcomes: string[] = [];
    for (const who of PRINCIPALS) {
      const res = await fetch(demo.urlFor(pattern), { redirect: "manual", headers: { cookie: cookies[who] } });
      await res.arrayBuffer();
      const ok = allowed(access, who) ? passed(res.status) : res.status === 403;
      if (!ok) outcomes.push(`${who}: expected ${allowed(access, who) ? "allowed" : "403"}, got ${res.status}`);
    }
    expect(outcomes).toEqual([]);
  });
});

describe("access matrix: posting", () => {
  const post = (pattern: string, cookie?: string) =>
    fetch(demo.urlFor(pattern), {
      method: "POST",
      body: new URLSearchParams(),
      redirect: "manual",
      headers: { Origin: baseUrl, ...(cookie ? { cookie } : {}) },
    });

  beforeAll(async () => {
    checksumsBefore = await demo.tableChecksums();
  });

  // Signing out ends the session it is posted with: each principal posts with a session of its own.
  const actions = Object.keys(ACTION_ACCESS);
  it.each(actions)("POST %s", async (pattern) => {
    const access = ACTION_ACCESS[pattern];
    const own = pattern === "/sign-out" ? await demo.signInAll() : cookies;
    const outcomes: string[] = [];
    for (const who of PRINCIPALS) {
      const res = await post(pattern, own[who]);
      await res.arrayBuffer();
      const ok = allowed(access, who) ? passed(res.status) : res.status === 403;
      if (!ok) outcomes.push(`${who}: expected ${allowed(access, who) ? "allowed" : "403"}, got ${res.status}`);
    }
    const signedOut = await post(pattern);
    await signedOut.arrayBuffer();
    if (access.kind === "public") {
      if (!passed(signedOut.status)) outcomes.push(`signed out: expected allowed, got ${signedOut.status}`);
    } else if (signedOut.status !== 302 || !signedOut.headers.get("location")?.startsWith("/sign-in")) {
      outcomes.push(`signed out: expected a redirect to sign-in, got ${signedOut.status}`);
    }
    expect(outcomes).toEqual([]);
  });

  it.each(routePatterns.filter((p) => !(p in ACTION_ACCESS)))("POST %s has no action: 405", async (pattern) => {
    const res = await post(pattern, cookies.owner);
    await res.arrayBuffer();
    expect(res.status).toBe(405);
  });

  it("changed nothing but sessions", async () => {
    expect(await demo.tableChecksums()).toEqual(checksumsBefore);
  });
});
