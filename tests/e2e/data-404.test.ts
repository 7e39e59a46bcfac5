// A single-fetch request (`.data`) for a path no route matches never reaches the root middleware,
// so its 404 must get the security headers elsewhere (handleDataRequest in app/entry.server.tsx),
// like the HTML 404 and every matched route do.
import { expect, inject, it } from "vitest";

const baseUrl = inject("baseUrl");

it.each([
  "/no-such-page.data",
  // A well-formed but unknown trial id with a path under it that no route declares.
  "/trials/3b1f2c4e-1111-4222-8333-444455556666/nothing.data",
])("a 404 for %s carries the security headers", async (path) => {
  const res = await fetch(`${baseUrl}${path}`, { redirect: "manual" });
  expect(res.status).toBe(404);
  expect(res.headers.get("x-content-type-options")).toBe("nosniff");
  expect(res.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
  expect(res.headers.get("x-frame-options")).toBe("DENY");
  expect(res.headers.get("permissions-policy")).toBe("camera=(), microphone=(), geolocation=()");
  // A data answer carries no scripts: the policy without a nonce.
  expect(res.headers.get("content-security-policy")).toContain("script-src 'self';");
  expect(res.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
});

it("a POST to an unknown .data path is a 404 with the same headers", async () => {
  const res = await fetch(`${baseUrl}/no-such-page.data`, { method: "POST", body: new URLSearchParams({ a: "1" }), redirect: "manual" });
  expect(res.status).toBe(404);
  expect(res.headers.get("x-content-type-options")).toBe("nosniff");
  expect(res.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
});
