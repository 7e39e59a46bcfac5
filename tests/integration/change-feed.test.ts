// The change feed the response cache trusts (app/.server/change-feed.ts, trigger from
// drizzle/0004_change_notifications.sql): every app table notifies, only committed changes count,
// recording an API key's use does not, and a lost listening connection means "don't know" (null)
// until it is back.
import { sql } from "drizzle-orm";
import { expect, it } from "vitest";

const { db, pool } = await import("~/.server/db");
const { changeEpoch } = await import("~/.server/change-feed");

const pause = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function until<T>(read: () => T, ok: (value: T) => boolean, ms = 3_000): Promise<T> {
  const deadline = Date.now() + ms;
  let value = read();
  while (!ok(value) && Date.now() < deadline) {
    await pause(20);
    value = read();
  }
  return value;
}

const listening = () => until(changeEpoch, (e) => e !== null);

it("puts the trigger on every table of the app except api_key", async () => {
  const { rows } = await pool.query<{ table: string; triggered: boolean }>(`
    select c.relname as table, exists (select 1 from pg_trigger t where t.tgrelid = c.oid and t.tgname = 'tilthmark_change') as triggered
    from pg_class c join pg_namespace n on n.oid = c.relnamespace
    where n.nspname = 'public' and c.relkind = 'r' order by 1`);
  expect(rows.length).toBeGreaterThan(20);
  const missing = rows.filter((r) => !r.triggered).map((r) => r.table);
  expect(missing).toEqual(["api_key"]);
});

it("moves on when a change commits, not before, and not for a rolled-back one", async () => {
  const start = await listening();
  expect(start).not.toBeNull();

  let duringTransaction: number | null = null;
  await db.transaction(async (tx) => {
    await tx.execute(sql`insert into organization (id, name, slug) values (gen_random_uuid(), 'Feed Test', 'feed-test')`);
    await pause(200);
    duringTransaction = changeEpoch();
  });
  expect(duringTransaction).toBe(start);
  const afterCommit = await until(changeEpoch, (e) => e !== start);
  expect(afterCommit).toBeGreaterThan(start!);

  await db
    .transaction(async (tx) => {
      await tx.execute(sql`delete from organization where slug = 'feed-test'`);
      throw new Error("roll back");
    })
    .catch(() => {});
  await pause(300);
  expect(changeEpoch()).toBe(afterCommit);

  await pool.query("delete from organization where slug = 'feed-test'");
  expect(await until(changeEpoch, (e) => e !== afterCommit)).toBeGreaterThan(afterCommit!);
});

it("ignores an API key's use being recorded", async () => {
  const epoch = await listening();
  await pool.query("update api_key set last_used_at = now()");
  await pause(300);
  expect(changeEpoch()).toBe(epoch);
});

it("says it does not know while its connection is down, and listens again", async () => {
  const before = await listening();
  const { rows } = await pool.query("select pg_terminate_backend(pid) from pg_stat_activity where datname = current_database() and query ilike 'LISTEN%'");
  expect(rows).toHaveLength(1);
  expect(await until(changeEpoch, (e) => e === null)).toBeNull();
  // Back within the retry interval, on an epoch none of the old entries carry.
  const after = await until(changeEpoch, (e) => e !== null, 5_000);
  expect(after).toBeGreaterThan(before!);
});
