// Every route in app/routes.ts, asked for while signed out: public routes answer, pages send
// the visitor to sign-in, API routes answer 401 JSON. A new route is covered automatically.
import { describe, expect, inject, it } from "vitest";
import routes from "~/routes";
import { ROUTE_ACCESS } from "~/route-access";

type Entry = { path?: string; index?: boolean; children?: Entry[] };

function flatten(entries: Entry[], parent = ""): string[] {
  return entries.flatMap((e) => {
    const here = e.path ? `${parent}/${e.path}`.replace(/\/+/g, "/") : parent || "/";
    const own = e.path || e.index ? [here] : [];
    return [...own, ...flatten(e.children ?? [], e.path ? here : parent)];
  });
}

const baseUrl = inject("baseUrl");
const paths = [...new Set(flatten(routes as Entry[]))];
const isPublic = (pattern: string) => ROUTE_ACCESS[pattern]?.kind === "public";
// Any well-formed id will do: signed-out requests must be refused before anything is looked up.
const concrete = (pattern: string) => pattern.replace(/:[A-Za-z]+/g, "00000000-0000-4000-8000-000000000000");

describe("signed-out access to every route", () => {
  it("finds the routes", () => {
    expect(paths).toContain("/home");
    expect(paths.length).toBeGreaterThan(10);
  });

  it.each(paths.filter((p) => !isPublic(p) && p !== "/dev/mailbox"))("%s is refused", async (pattern) => {
    const res = await fetch(`${baseUrl}${concrete(pattern)}`, { redirect: "manual" });
    if (pattern.startsWith("/api/")) {
      expect(res.status).toBe(401);
      expect(await res.json()).toEqual({ error: "Sign in required." });
    } else if (pattern === "/sign-out") {
      expect(res.status).toBe(302);
    } else {
      expect(res.status).toBe(302);
      expect(res.headers.get("location")).toMatch(/^\/sign-in\?redirectTo=/);
    }
  });

  it.each(paths.filter(isPublic).filter((p) => !p.includes(":")))("%s is open", async (pattern) => {
    const res = await fetch(`${baseUrl}${pattern}`, { redirect: "manual" });
    if (pattern === "/setup") {
      // First-run only: on an install with accounts it points to sign-in.
      expect(res.status).toBe(302);
      expect(res.headers.get("location")).toBe("/sign-in");
    } else {
      expect(res.status).toBe(200);
    }
  });
});

describe("web security", () => {
  it("sends security headers with pages and JSON", async () => {
    for (const path of ["/", "/api/programs/x/trials"]) {
      const res = await fetch(`${baseUrl}${path}`, { redirect: "manual" });
      expect(res.headers.get("x-content-type-options")).toBe("nosniff");
      expect(res.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
      expect(res.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
    }
  });

  it("refuses a form posted from another site and lets the same site through", async () => {
    const body = new URLSearchParams({ email: "owner@cedarhollow.example", password: "tilthmark-demo" });
    const forged = await fetch(`${baseUrl}/sign-in`, { method: "POST", body, redirect: "manual", headers: { Origin: "http://evil.example" } });
    expect(forged.status).toBeGreaterThanOrEqual(400);
    expect(forged.headers.get("set-cookie")).toBeNull();
    const own = await fetch(`${baseUrl}/sign-in`, { method: "POST", body, redirect: "manual", headers: { Origin: baseUrl } });
    expect(own.status).toBe(302);
    expect(own.headers.get("set-cookie")).toContain("session_token");
  });

  it("marks the session cookie HttpOnly and SameSite=Lax", async () => {
    const body = new URLSearchParams({ email: "researcher@cedarhollow.example", password: "tilthmark-demo" });
    const res = await fetch(`${baseUrl}/sign-in`, { method: "POST", body, redirect: "manual", headers: { Origin: baseUrl } });
    const cookie = res.headers.getSetCookie().find((c) => c.includes("session_token"))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
  });
});
