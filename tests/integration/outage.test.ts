// While the database cannot be reached, a server error becomes a 503 that says so, and writes from
// other sites are refused before anything runs. (DATABASE_URL points at a port nothing listens on.)
import { expect, it } from "vitest";

it("answers 503 with a plain explanation when the database is down", async () => {
  process.env.DATABASE_URL = "postgres://postgres@127.0.0.1:9/tilthmark";
  const { guardRequest } = await import("~/.server/http-guard");
  const failing = () => Promise.resolve(new Response("boom", { status: 500 }));

  const page = await guardRequest(new Request("http://127.0.0.1:3999/home"), failing);
  expect(page.status).toBe(503);
  expect(page.headers.get("retry-after")).toBe("30");
  expect(await page.text()).toContain("Tilthmark can't reach its database");

  const api = await guardRequest(new Request("http://127.0.0.1:3999/api/trials/x/results"), failing);
  expect(api.status).toBe(503);
  expect(await api.json()).toEqual({ error: "The database is unavailable; try again shortly." });
  expect(api.headers.get("x-content-type-options")).toBe("nosniff");

  let ran = false;
  const forged = await guardRequest(
    new Request("http://127.0.0.1:3999/sign-in", { method: "POST", headers: { Origin: "http://evil.example" } }),
    async () => {
      ran = true;
      return new Response("ok");
    },
  );
  expect(forged.status).toBe(403);
  expect(ran).toBe(false);
}, 20_000);
