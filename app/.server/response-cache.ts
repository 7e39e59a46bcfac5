// Rendered responses kept per browser session and URL, so a page or chart read again before
// anything changed is answered without running its loaders or rendering it again.
//
// An entry is served only while all of these hold:
// - no change was committed to the app's tables since it was rendered (the change feed's epoch is
//   the same; app/.server/change-feed.ts), which covers the data shown, memberships and roles,
//   accounts and sessions (a sign-out or a revoked session empties the cache);
// - the same Cookie header asks for it (so the same session, and nothing else that cookies carry);
// - its session has neither expired nor come due for better-auth's refresh;
// - it is less than a minute old (pages say "today", invitations expire);
// - the browser has not written anything in the last few seconds (RECENT_WRITE_COOKIE), so whoever
//   just saved something sees it even if another worker has not heard of the change yet.
// Only 200 answers to GET, for a signed-in browser session, without Set-Cookie, are kept; requests
// with an API key are never answered from here. Each HTML document keeps its own fresh CSP nonce.
import { randomBytes } from "node:crypto";
import { LRUCache } from "lru-cache";
import type { MiddlewareFunction } from "react-router";
import { changeEpoch } from "./change-feed";
import { env } from "./env";
import { requestFacts } from "./request-context";

const MAX_AGE_MS = 60_000;
/** How long after a write the writer's own reads skip the cache. */
const RECENT_WRITE_MS = 10_000;
export const RECENT_WRITE_COOKIE = "tilthmark_wrote";
const RECENT_WRITE = new RegExp(`(?:^|;\\s*)${RECENT_WRITE_COOKIE}=(\\d+)`);
const SESSION_COOKIE = /(^|;\s*)(__Secure-)?better-auth\.session_token=/;
const NONCE = /'nonce-([A-Za-z0-9+/=]+)'/;

type Entry = {
  epoch: number;
  goodUntil: number;
  userId: string | null;
  status: number;
  headers: [string, string][];
  /** HTML documents are kept as text, so their nonce can be replaced; everything else as bytes. */
  body: string | Uint8Array<ArrayBuffer>;
  nonce: string | null;
};

const entries = new LRUCache<string, Entry>({
  maxSize: env.RESPONSE_CACHE_MB * 1024 * 1024,
  sizeCalculation: (entry, key) => key.length + 512 + (typeof entry.body === "string" ? entry.body.length * 2 : entry.body.byteLength),
});

/** Milliseconds since the browser's last write, or null when it has not written lately. */
function recentWriteAge(cookie: string): number | null {
  const match = RECENT_WRITE.exec(cookie);
  if (!match) return null;
  const age = Date.now() - Number(match[1]);
  return age >= 0 && age < RECENT_WRITE_MS ? age : null;
}

/**
 * The cookie a write's answer sets: for a few seconds the writer's reads skip the cache. Set by the
 * request guard on every answer to a POST, PUT, PATCH or DELETE.
 */
export function recentWriteCookie(): string {
  const secure = env.TILTHMARK_BASE_URL.startsWith("https://") ? "; Secure" : "";
  return `${RECENT_WRITE_COOKIE}=${Date.now()}; Max-Age=${RECENT_WRITE_MS / 1000}; Path=/; HttpOnly; SameSite=Lax${secure}`;
}

function cacheKey(request: Request, cookie: string): string | null {
  if (env.RESPONSE_CACHE_MB === 0 || request.method !== "GET") return null;
  if (!SESSION_COOKIE.test(cookie) || request.headers.has("x-api-key")) return null;
  if (recentWriteAge(cookie) !== null) return null;
  return `${request.url}\n${cookie}`;
}

function answer(entry: Entry): Response {
  const headers = new Headers(entry.headers);
  let body = entry.body;
  if (entry.nonce && typeof body === "string") {
    const nonce = randomBytes(16).toString("base64");
    body = body.replaceAll(entry.nonce, nonce);
    headers.set("Content-Security-Policy", (headers.get("Content-Security-Policy") ?? "").replace(entry.nonce, nonce));
  }
  return new Response(body, { status: entry.status, headers });
}

/**
 * Route middleware for pages and JSON routes that only read: answers from the cache when it may,
 * otherwise lets the route answer and keeps the answer when it may be kept.
 */
export const cacheResponse: MiddlewareFunction<Response> = async ({ request }, next) => {
  const cookie = request.headers.get("cookie") ?? "";
  const key = cacheKey(request, cookie);
  const facts = requestFacts.getStore();
  if (!key || !facts) return next();

  const epoch = changeEpoch();
  const cached = entries.get(key);
  if (cached && epoch !== null && cached.epoch === epoch && Date.now() < cached.goodUntil) {
    facts.userId = cached.userId;
    facts.cache = "hit";
    return answer(cached);
  }

  // The epoch is taken before the route reads anything: a change heard of meanwhile makes the entry stale at once.
  const response = await next();
  facts.cache = "miss";
  if (epoch === null || response.status !== 200 || response.headers.has("set-cookie") || !facts.sessionGoodUntil) return response;
  const headers = [...response.headers];
  const nonce = NONCE.exec(response.headers.get("Content-Security-Policy") ?? "")?.[1] ?? null;
  const html = response.headers.get("Content-Type")?.startsWith("text/html") ?? false;
  const body = html ? await response.text() : new Uint8Array(await response.arrayBuffer());
  const entry: Entry = {
    epoch,
    goodUntil: Math.min(Date.now() + MAX_AGE_MS, facts.sessionGoodUntil),
    userId: facts.userId,
    status: response.status,
    headers,
    body,
    nonce: html ? nonce : null,
  };
  entries.set(key, entry);
  return new Response(body, { status: response.status, headers: new Headers(headers) });
};
