import { sql } from "drizzle-orm";
import { db } from "~/.server/db";

/** Liveness and database reachability, for load balancers. Public by design. */
export async function loader() {
  try {
    await db.execute(sql`select 1`);
    return Response.json({ status: "ok", database: "ok" });
  } catch {
    return Response.json({ status: "degraded", database: "unreachable" }, { status: 503 });
  }
}
