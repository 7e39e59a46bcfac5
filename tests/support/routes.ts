// Every route of app/routes.ts as a concrete URL on the demo trial, and signed-in cookies for each
// demo role and for the owner of another program: shared by the access matrix and the hostile-input
// browser tests, which run against the e2e server and its seeded database.
import { randomUUID } from "node:crypto";
import { hashPassword } from "better-auth/crypto";
import pg from "pg";
import { ROLES } from "~/permissions";
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

/** Every route pattern, e.g. "/trials/:trialId/results". */
export const routePatterns = [...new Set(flatten(routes as Entry[]))];

export const PRINCIPALS = [...ROLES, "outsider"] as const;
export type Principal = (typeof PRINCIPALS)[number];

export interface DemoRoutes {
  ids: Record<string, string>;
  /** A concrete URL for a pattern, with the query some pages need. */
  urlFor(pattern: string): string;
  /** A fresh session for each demo role and for the other program's owner. */
  signInAll(): Promise<Record<Principal, string>>;
  /** md5 of every table's rows, except the sessions that signing in writes. */
  tableChecksums(): Promise<Record<string, string>>;
  /** Rows in a table. */
  count(table: string): Promise<number>;
  /** Ids of the rows of a table that belong to the demo trial. */
  trialRowIds(table: string): Promise<string[]>;
  close(): Promise<void>;
}

export async function signInCookie(baseUrl: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${baseUrl}/sign-in`, { method: "POST", body: new URLSearchParams({ email, password }), redirect: "manual", headers: { Origin: baseUrl } });
  const cookie = res.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");
  if (!cookie.includes("session_token")) throw new Error(`could not sign in as ${email}`);
  return cookie;
}

export async function demoRoutes(baseUrl: string, databaseUrl: string): Promise<DemoRoutes> {
  const client = new pg.Client({ connectionString: databaseUrl });
  await client.connect();
  const one = async <T extends pg.QueryResultRow>(sql: string, params: unknown[] = []): Promise<T> => {
    const { rows } = await client.query<T>(sql, params);
    if (!rows[0]) throw new Error(`no row for ${sql}`);
    return rows[0];
  };
  const ids: Record<string, string> = {};
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
  const outsiderEmail = `outsider-${program.slice(0, 8)}@matrix.example`;
  await client.query("insert into organization (id, name, slug) values ($1, 'Matrix Station', $2)", [program, `matrix-${program.slice(0, 8)}`]);
  const user = randomUUID();
  await client.query("insert into \"user\" (id, name, email) values ($1, 'Matrix Outsider', $2)", [user, outsiderEmail]);
  await client.query("insert into account (id, account_id, provider_id, user_id, password) values ($1, $2, 'credential', $2, $3)", [randomUUID(), user, await hashPassword("outsider-password")]);
  await client.query("insert into member (id, organization_id, user_id, role) values ($1, $2, $3, 'owner')", [randomUUID(), program, user]);

  const query: Record<string, string> = {
    "/trials/:trialId/sampling/sheet": `?event=${ids.eventId}`,
    "/trials/:trialId/sampling/labels": `?event=${ids.eventId}`,
    "/trials/:trialId/intake/entry": `?event=${ids.eventId}&kind=loi`,
    "/trials/:trialId/data/sample": `?code=${encodeURIComponent(ids.sampleCode)}`,
    "/api/trials/:trialId/sample-sheet.csv": `?event=${ids.eventId}`,
    "/api/trials/:trialId/template.csv": `?event=${ids.eventId}&kind=loi`,
  };
  return {
    ids,
    urlFor(pattern) {
      const path = pattern
        .replace(":file", "anova.csv")
        .replace(":version", "1")
        .replace(/:([A-Za-z]+)/g, (_, name: string) => ids[name] ?? `unknown-${name}`);
      return `${baseUrl}${path}${query[pattern] ?? ""}`;
    },
    async signInAll() {
      const cookies = { outsider: await signInCookie(baseUrl, outsiderEmail, "outsider-password") } as Record<Principal, string>;
      for (const role of ROLES) cookies[role] = await signInCookie(baseUrl, `${role}@cedarhollow.example`, DEMO_PASSWORD);
      return cookies;
    },
    async tableChecksums() {
      const { rows } = await client.query<{ table_name: string }>(
        "select table_name from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' and table_name <> 'session' order by table_name",
      );
      const sums: Record<string, string> = {};
      for (const { table_name } of rows) {
        const q = `select count(*)::text || ':' || coalesce(md5(string_agg(t::text, '|' order by t::text)), '') as sum from "${table_name}" t`;
        sums[table_name] = (await one<{ sum: string }>(q)).sum;
      }
      return sums;
    },
    trialRowIds: async (table) => (await client.query<{ id: string }>(`select id from "${table}" where trial_id = $1 order by id`, [ids.trialId])).rows.map((r) => r.id),
    count: async (table) => Number((await one<{ n: string }>(`select count(*) as n from "${table}"`)).n),
    close: () => client.end(),
  };
}
