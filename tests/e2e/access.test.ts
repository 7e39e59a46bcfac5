// Every route in app/routes.ts, asked for while signed out: public routes answer, pages send
// the visitor to sign-in, API routes answer 401 JSON. A new route is covered automatically.
import { describe, expect, inject, it } from "vitest";
import { ROUTE_ACCESS } from "~/route-access";
import { routePatterns as paths } from "../support/routes";

const baseUrl = inject("baseUrl");
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
    for (const path of ["/", "/api/programs/x/trials", "/no-such-page"]) {
      const res = await fetch(`${baseUrl}${path}`, { redirect: "manual" });
      expect(res.headers.get("x-content-type-options")).toBe("nosniff");
      expect(res.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
      expect(res.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
    }
  });

  it("allows no inline script without the document's own nonce", async () => {
    const scriptSrc = (csp: string | null) => (csp ?? "").split(";").map((d) => d.trim()).find((d) => d.startsWith("script-src")) ?? "";
    const pages = await Promise.all([fetch(`${baseUrl}/`), fetch(`${baseUrl}/sign-in`)]);
    const nonces = pages.map((res) => scriptSrc(res.headers.get("content-security-policy")).match(/'nonce-([A-Za-z0-9+/=]+)'/)?.[1]);
    expect(nonces[0]).toBeTruthy();
    expect(nonces[0]).not.toBe(nonces[1]); // a fresh nonce per document
    for (const [i, res] of pages.entries()) {
      expect(scriptSrc(res.headers.get("content-security-policy"))).not.toContain("unsafe-inline");
      const html = await res.text();
      const inline = [...html.matchAll(/<script\b([^>]*)>/g)].map((m) => m[1]).filter((attrs) => !/\bsrc=/.test(attrs));
      expect(inline.length).toBeGreaterThan(0); // React Router's hydration data
      for (const attrs of inline) expect(attrs).toContain(`nonce="${nonces[i]}"`);
    }
    const json = await fetch(`${baseUrl}/api/programs/x/trials`);
    expect(scriptSrc(json.headers.get("content-security-policy"))).toBe("script-src 'self'");
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
