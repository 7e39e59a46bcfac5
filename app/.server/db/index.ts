import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import { env } from "../env";
import * as schema from "./schema";

// A bounded wait for a connection, so requests during a database outage fail fast (503) instead of hanging.
// Idle connections do not keep the process alive, so a stopped HTTP server (SIGTERM) lets it exit
// once in-flight requests are done.
export const pool = new pg.Pool({ connectionString: env.DATABASE_URL, max: 10, connectionTimeoutMillis: 5_000, allowExitOnIdle: true });
// A dropped connection (e.g. the database restarting) must not crash the server.
pool.on("error", (error) => console.error("[db] idle client error:", error.message));
// A connection killed mid-transaction rejects its query (the transaction rolls back); the client's
// own error event must not become an uncaught exception either.
pool.on("connect", (client) => client.on("error", (error) => console.error("[db] connection error:", error.message)));

export const db = drizzle(pool, { schema });

/** True when the database answers a trivial query within a second. */
export async function databaseReachable(): Promise<boolean> {
  const timeout = new Promise<boolean>((resolve) => setTimeout(() => resolve(false), 1_000).unref());
  const probe = pool.query("select 1").then(
    () => true,
    () => false,
  );
  return Promise.race([probe, timeout]);
}
export type Db = typeof db;
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
export { schema };
