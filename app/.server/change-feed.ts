// Which committed changes this process has heard of. Every change to the app's tables sends a
// notification at commit (trigger "tilthmark_change", drizzle/0004_change_notifications.sql); one
// connection per process listens, and each notification moves the epoch on. Whatever was read
// under an earlier epoch may be out of date. While the connection is down nobody knows what
// changed: changeEpoch() is null, and nothing may be served from a cache.
import pg from "pg";
import { env } from "./env";

const CHANNEL = "tilthmark_change";
const RETRY_MS = 1_000;

let epoch = 0;
let listener: pg.Client | null = null;
let live = false;
let retry: NodeJS.Timeout | null = null;
let reportedDown = false;

/** The current epoch, or null while this process is not (yet) listening. Starts listening on first use. */
export function changeEpoch(): number | null {
  if (!listener && !retry) connect();
  return live ? epoch : null;
}

function connect() {
  const client = new pg.Client({ connectionString: env.DATABASE_URL });
  listener = client;
  let lost = false;
  const onLost = (error?: Error) => {
    if (lost) return;
    lost = true;
    // Anything heard so far may have missed changes made while the connection was down.
    live = false;
    epoch++;
    listener = null;
    client.end().catch(() => {});
    if (!reportedDown) console.error(`[change-feed] not listening (${error?.message ?? "connection closed"}); cached responses are not served until it is back`);
    reportedDown = true;
    retry = setTimeout(() => {
      retry = null;
      connect();
    }, RETRY_MS);
    retry.unref();
  };
  client.on("notification", () => {
    epoch++;
  });
  client.on("error", onLost);
  client.on("end", () => onLost());
  client
    .connect()
    .then(() => {
      // The listening connection alone must not keep a stopping process alive.
      (client as unknown as { connection: { stream: { unref?: () => void } } }).connection.stream.unref?.();
      return client.query(`LISTEN ${CHANNEL}`);
    })
    .then(() => {
      if (lost) return;
      epoch++;
      live = true;
      if (reportedDown) console.error("[change-feed] listening again");
      reportedDown = false;
    })
    .catch(onLost);
}
