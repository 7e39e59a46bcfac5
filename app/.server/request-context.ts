// Per-request facts that outlive a single function call: who the request acts for, for the log,
// and reads that the loaders of one page share.
import { AsyncLocalStorage } from "node:async_hooks";

export type RequestFacts = {
  userId: string | null;
  shared?: Map<string, Promise<unknown>>;
  /** Until when the request's session is good as it stands (ms since epoch): it expires, or is due a refresh. */
  sessionGoodUntil?: number;
  /** Whether the response came from the response cache (app/.server/response-cache.ts), for the log. */
  cache?: "hit" | "miss";
};

export const requestFacts = new AsyncLocalStorage<RequestFacts>();

export function noteUser(userId: string) {
  const facts = requestFacts.getStore();
  if (facts) facts.userId = userId;
}

/** The request acts through a browser session that stays good as it is until `goodUntil` (ms). */
export function noteSession(goodUntil: number) {
  const facts = requestFacts.getStore();
  if (facts) facts.sessionGoodUntil = goodUntil;
}

const READ_ONLY = new Set(["GET", "HEAD"]);

/**
 * A read that several loaders of one page need (the session, a membership, a trial's overview),
 * made once per request: the loaders of a page run side by side on the same request. Only for
 * GET and HEAD — after an action the loaders must see what it changed (a sign-out, a removed
 * member) — and never across requests. Outside a request it simply reads.
 */
export function sharedRead<T>(request: Request, key: string, read: () => Promise<T>): Promise<T> {
  const facts = requestFacts.getStore();
  if (!facts || !READ_ONLY.has(request.method)) return read();
  facts.shared ??= new Map();
  let pending = facts.shared.get(key) as Promise<T> | undefined;
  if (!pending) {
    pending = read();
    facts.shared.set(key, pending);
  }
  return pending;
}
