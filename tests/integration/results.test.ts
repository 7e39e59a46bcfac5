// The results route: the same numbers as the library, the right refusals, caching by data version.
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db, schema } from "~/.server/db";
import { loadDerivedSamples } from "~/.server/intake/derived";
import { plotObservations } from "~/.server/results/observations";
import { seedDemo } from "~/.server/seed";
import * as resultsApi from "~/routes/api.trial-results";
import { rcbdAnova } from "../../analysis/stats";
import { DEMO_PASSWORD } from "../../datasets/demo/scenario";
import { cookieFor, outcome, requestAs } from "../support/sessions";

let trialId: string;
const cookies: Record<string, string> = {};

beforeAll(async () => {
  ({ trialId } = await seedDemo());
  for (const role of ["collaborator", "extension"]) cookies[role] = await cookieFor(`${role}@cedarhollow.example`, DEMO_PASSWORD);
}, 120_000);

const call = (cookie: string | null, query: string) =>
  outcome(() => resultsApi.loader({ request: requestAs(cookie, `/api/trials/${trialId}/results?${query}`), params: { trialId }, context: {} } as never));

describe("results API", () => {
  it("gives a collaborator the per-season RCBD that the library computes from the same plots", async () => {
    const samples = await loadDerivedSamples(trialId, { measuredOnly: true });
    const lastSeason = [...samples].sort((a, b) => a.seasonOrdinal - b.seasonOrdinal).at(-1)!.season;
    const result = await call(cookies.collaborator, `variable=som&depth=0-10&model=per_season&season=${encodeURIComponent(lastSeason)}`);
    expect(result.status).toBe(200);
    const body = result.body as { results: { anova: { source: string; ss: number; f: number | null }[] } };

    const plots = plotObservations(samples, "som", { topCm: 0, bottomCm: 10, cumulative: false }, null).filter((o) => o.season === lastSeason);
    const direct = rcbdAnova(plots.map((p) => ({ block: String(p.block), treatment: p.treatment, value: p.value })));
    for (const source of ["block", "treatment", "residual"]) {
      const fromRoute = body.results.anova.find((r) => r.source === source)!;
      const fromLibrary = direct.table.find((r) => r.source === source)!;
      expect(fromRoute.ss).toBeCloseTo(fromLibrary.ss, 9);
    }
  });

  it("refuses extension agents (403) and signed-out callers (401)", async () => {
    expect((await call(cookies.extension, "variable=som")).status).toBe(403);
    expect((await call(null, "variable=som")).status).toBe(401);
  });

  it("answers 400 with a message for an unknown variable, season or depth", async () => {
    const variable = await call(cookies.collaborator, "variable=earthworms");
    expect(variable).toMatchObject({ status: 400 });
    expect((variable.body as { error: string }).error).toMatch(/No values of “earthworms” in this trial/);
    const season = await call(cookies.collaborator, "variable=som&season=1999%20spring");
    expect((season.body as { error: string }).error).toMatch(/no season “1999 spring”/);
    const depth = await call(cookies.collaborator, "variable=som&depth=0-7");
    expect((depth.body as { error: string }).error).toMatch(/no 0–7 cm increment/);
    const model = await call(cookies.collaborator, "variable=som&model=magic");
    expect(model.status).toBe(400);
  });

  it("names the missing plot-season when the split-plot in time cannot run", async () => {
    const result = await call(cookies.collaborator, "variable=som&depth=0-10&model=split_plot_time");
    // The demo has one missing plot-season by design (datasets/demo/measurements.ts).
    expect(result.status).toBe(400);
    expect((result.body as { error: string }).error).toMatch(/Analyse each season on its own/);
  });

  it("recomputes when the trial's data change", async () => {
    const before = await call(cookies.collaborator, "variable=som&depth=0-10");
    await db.update(schema.trials).set({ dataVersion: 999 }).where(eq(schema.trials.id, trialId));
    const after = await call(cookies.collaborator, "variable=som&depth=0-10");
    expect((before.body as { dataVersion: number }).dataVersion).not.toBe(999);
    expect((after.body as { dataVersion: number }).dataVersion).toBe(999);
  });
});

describe("API keys", () => {
  it("let a collaborator's script read results until the key is revoked", async () => {
    const account = await import("~/routes/account");
    const { formPost } = await import("../support/sessions");
    const created = await outcome(() =>
      account.action({ request: formPost(cookies.collaborator, "/account", { intent: "create-key", keyName: "nightly script" }), params: {}, context: {} } as never),
    );
    const key = (created.body as { newKey: string }).newKey;
    expect(key).toMatch(/^tm_/);
    const [stored] = await db.select().from(schema.apiKeys).where(eq(schema.apiKeys.name, "nightly script"));
    expect(stored.keyHash).not.toContain(key.slice(3)); // only a fingerprint is kept

    const withKey = (k: string) => requestAs(null, `/api/trials/${trialId}/results?variable=som`, { headers: { "x-api-key": k } });
    const ok = await outcome(() => resultsApi.loader({ request: withKey(key), params: { trialId }, context: {} } as never));
    expect(ok.status).toBe(200);

    await outcome(() =>
      account.action({ request: formPost(cookies.collaborator, "/account", { intent: "revoke-key", keyId: stored.id }), params: {}, context: {} } as never),
    );
    const revoked = await outcome(() => resultsApi.loader({ request: withKey(key), params: { trialId }, context: {} } as never));
    expect(revoked).toMatchObject({ status: 401, body: { error: "This API key is not valid or was revoked." } });
  });

  it("gives an extension agent's key no more than the extension role", async () => {
    const { createApiKey } = await import("~/.server/api-keys");
    const [ext] = await db.select().from(schema.users).where(eq(schema.users.email, "extension@cedarhollow.example"));
    const { key } = await createApiKey(ext.id, "brief fetcher");
    const request = requestAs(null, `/api/trials/${trialId}/results?variable=som`, { headers: { "x-api-key": key } });
    const result = await outcome(() => resultsApi.loader({ request, params: { trialId }, context: {} } as never));
    expect(result.status).toBe(403);
  });
});
