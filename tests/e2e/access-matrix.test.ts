// Every route in app/routes.ts, read (GET) as each demo role, as the owner of another program and
// signed out, against the access declared in app/route-access.ts. A route without a declared
// access fails here, so a new route cannot slip in unguarded.
import { randomUUID } from "node:crypto";
import { hashPassword } from "better-auth/crypto";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { roleCan, ROLES } from "~/permissions";
import { ROUTE_ACCESS } from "~/route-access";
import routes from "~/routes";
import { DEMO_PASSWORD, demoTrial } from "../../datasets/demo/scenario";

type Entry = { path?: string; index?: boolean; children?: Entry[] };
function flatten(entries: Entry[], parent = ""): string[] {
  return entries.flatMap((e) => {
    const here = e.path ? `${parent}/${e.path}`.replace(/\/+/g, "/") : parent || "/";
    const own = e.path || e.index ? [here] : [];
    return [...own, ...flatten(e.children ?? [], e.path ? here : parent)];
  });
}

const baseUrl = inject("baseUrl");
const patterns = [...new Set(flatten(routes as Entry[]))];
const ids: Record<string, string> = {};
const cookies: Record<string, string> = {};
let client: pg.Client;

async function signIn(email: string, password: string): Promise<string> {
  const res = await fetch(`${baseUrl}/sign-in`, {
    method: "POST",
    body: new URLSearchParams({ email, password }),
    redirect: "manual",
    headers: { Origin: baseUrl },
  });
  const cookie = res.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");
  if (!cookie.includes("session_token")) throw new Error(`could not sign in as ${email}`);
  return cookie;
}

async function one<T extends pg.QueryResultRow>(sql: string, params: unknown[] = []): Promise<T> {
  const { rows } = await client.query<T>(sql, params);
  if (!rows[0]) throw new Error(`no row for ${sql}`);
  return rows[0];
}

beforeAll(async () => {
  client = new pg.Client({ connectionString: inject("databaseUrl") });
  await client.connect();
  const trial = await one<{ id: string; program_id: string }>("select id, program_id from trial where title = $1", [demoTrial.title]);
  ids.trialId = trial.id;
  ids.programId = trial.program_id;
  ids.briefId = (await one<{ id: string }>("select id from brief where trial_id = $1 order by created_at limit 1", [trial.id])).id;
  ids.uploadId = (await one<{ id: string }>("select id from upload where trial_id = $1 limit 1", [trial.id])).id;
  ids.siteId = (await one<{ id: string }>("select id from site where program_id = $1 limit 1", [trial.program_id])).id;
  const batch = await one<{ id: string; amendment_id: string }>(
    "select b.id, b.amendment_id from amendment_batch b join amendment a on a.id = b.amendment_id where a.program_id = $1 limit 1",
    [trial.program_id],
  );
  ids.batchId = batch.id;
  ids.amendmentId = batch.amendment_id;
  ids.eventId = (await one<{ id: string }>("select id from sampling_event where trial_id = $1 order by event_date limit 1", [trial.id])).id;
  ids.sampleCode = (await one<{ code: string }>("select code from sample where trial_id = $1 limit 1", [trial.id])).code;

  // The owner of another program: must be refused everything inside Cedar Hollow.
  const program = randomUUID();
  const user = randomUUID();
  await client.query("insert into organization (id, name, slug) values ($1, 'Matrix Station', $2)", [program, `matrix-${program.slice(0, 8)}`]);
  await client.query("insert into \"user\" (id, name, email) values ($1, 'Matrix Outsider', $2)", [user, `outsider-${program.slice(0, 8)}@matrix.example`]);
  await client.query("insert into account (id, account_id, provider_id, user_id, password) values ($1, $2, 'credential', $2, $3)", [
    randomUUID(),
    user,
    await hashPassword("outsider-password"),
  ]);
  await client.query("insert into member (id, organization_id, user_id, role) values ($1, $2, $3, 'owner')", [randomUUID(), program, user]);
  cookies.outsider = await signIn(`outsider-${program.slice(0, 8)}@matrix.example`, "outsider-password");
  for (const role of ROLES) cookies[role] = await signIn(`${role}@cedarhollow.example`, DEMO_PASSWORD);
});

afterAll(async () => {
  await client?.end();
});

/** A concrete URL for a pattern, with the query some pages need. */
function urlFor(pattern: string): string {
  const path = pattern
    .replace(":file", "anova.csv")
    .replace(":version", "1")
    .replace(/:([A-Za-z]+)/g, (_, name: string) => ids[name] ?? `unknown-${name}`);
  const query: Record<string, string> = {
    "/trials/:trialId/sampling/sheet": `?event=${ids.eventId}`,
    "/trials/:trialId/sampling/labels": `?event=${ids.eventId}`,
    "/trials/:trialId/intake/entry": `?event=${ids.eventId}&kind=loi`,
    "/trials/:trialId/data/sample": `?code=${encodeURIComponent(ids.sampleCode)}`,
    "/api/trials/:trialId/sample-sheet.csv": `?event=${ids.eventId}`,
    "/api/trials/:trialId/template.csv": `?event=${ids.eventId}&kind=loi`,
  };
  return `${baseUrl}${path}${query[pattern] ?? ""}`;
}

const principals = [...ROLES, "outsider"] as const;

describe("access matrix", () => {
  it("has a declared access for every route, and no stale entries", () => {
    expect(patterns.filter((p) => !(p in ROUTE_ACCESS))).toEqual([]);
    expect(Object.keys(ROUTE_ACCESS).filter((p) => !patterns.includes(p))).toEqual([]);
  });

  it.each(patterns.filter((p) => p in ROUTE_ACCESS))("%s", async (pattern) => {
    const access = ROUTE_ACCESS[pattern];
    const outcomes: string[] = [];
    for (const who of principals) {
      const res = await fetch(urlFor(pattern), { redirect: "manual", headers: { cookie: cookies[who] } });
      await res.arrayBuffer();
      const allowed =
        access.kind === "permission"
          ? who !== "outsider" && roleCan(who, access.permission)
          : true; // public, signed-in, demo-only, and the demo's public brief are open to everyone signed in
      const ok = allowed ? res.status < 500 && res.status !== 401 && res.status !== 403 : res.status === 403;
      if (!ok) outcomes.push(`${who}: expected ${allowed ? "allowed" : "403"}, got ${res.status}`);
    }
    expect(outcomes).toEqual([]);
  });
});
