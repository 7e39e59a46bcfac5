// What every request passes through (root middleware): cross-origin writes refused, security
// headers set, a database outage answered with 503, and one structured log line per request
// (method, path, status, ms, user id — never bodies, passwords, tokens or keys).
import { databaseReachable } from "./db";
import { env } from "./env";
import { type RequestFacts, requestFacts } from "./request-context";
import { recentWriteCookie } from "./response-cache";

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * The Content-Security-Policy: everything from this origin, no inline scripts. An HTML document
 * passes the nonce its entry gave React Router's own inline scripts (hydration data, scroll
 * restoration); other responses carry no scripts at all. Inline styles stay allowed: Observable
 * Plot writes style attributes into the charts it draws.
 */
export function contentSecurityPolicy(nonce?: string): string {
  return [
    "default-src 'self'",
    nonce ? `script-src 'self' 'nonce-${nonce}'` : "script-src 'self'",
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}

/**
 * The headers every response carries. HTML documents get them from app/entry.server.tsx with their
 * nonce (that also covers pages no route matched, which skip the middleware); everything else here.
 */
export function securityHeaders(nonce?: string): Record<string, string> {
  return {
    "X-Content-Type-Options": "nosniff",
    "Referrer-Policy": "strict-origin-when-cross-origin",
    "X-Frame-Options": "DENY",
    "Permissions-Policy": "camera=(), microphone=(), geolocation=()",
    "Content-Security-Policy": contentSecurityPolicy(nonce),
  };
}

const SECURITY_HEADERS = securityHeaders();

/** A write from another site (a forged form post) is refused; requests without Origin are not browsers' cross-site posts. */
export function crossOriginWrite(request: Request): boolean {
  if (SAFE_METHODS.has(request.method)) return false;
  if (request.headers.get("sec-fetch-site") === "cross-site") return true;
  const origin = request.headers.get("origin");
  if (!origin || origin === "null") return origin === "null";
  const allowed = new Set([new URL(request.url).origin, new URL(env.TILTHMARK_BASE_URL).origin]);
  return !allowed.has(origin);
}

/** Forms are small; only the lab-file upload takes a large body, and it enforces its own 20 MB cap. */
const MAX_FORM_BYTES = 1024 * 1024;
const MAX_DRAIN_BYTES = 32 * 1024 * 1024;
const UPLOAD_PATH = /^\/trials\/[^/]+\/intake(\.data)?$/;

/** A declared body larger than any form (a junk flood) is refused before anything reads it. */
function oversizedForm(request: Request, path: string): boolean {
  if (SAFE_METHODS.has(request.method) || UPLOAD_PATH.test(path)) return false;
  return Number(request.headers.get("content-length") ?? 0) > MAX_FORM_BYTES;
}

/**
 * Reads to the end, and drops, a body the route answered without reading (a refusal, a 404, a
 * form that was too large): the sender then gets the answer, and the connection stays usable,
 * instead of a reset while it is still sending.
 */
async function drainBody(request: Request): Promise<void> {
  if (!request.body || request.bodyUsed || request.body.locked) return;
  let read = 0;
  try {
    for await (const chunk of request.body) {
      read += chunk.byteLength;
      // Past the largest upload there is nothing worth waiting for: stop reading; the connection closes.
      if (read > MAX_DRAIN_BYTES) break;
    }
  } catch {
    /* the sender went away; nothing to answer */
  }
}

const UNAVAILABLE_PAGE = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Tilthmark is briefly unavailable</title>
<meta name="viewport" content="width=device-width, initial-scale=1"></head>
<body style="font-family: system-ui, sans-serif; max-width: 36rem; margin: 4rem auto; padding: 0 1rem; color: #2b2118">
<h1>Tilthmark can't reach its database</h1>
<p>The database is restarting or unreachable. Nothing you submitted was saved half-way: changes are saved all at once or not at all.</p>
<p>Please try again in a minute.</p></body></html>`;

/** A server error while the database is down is an outage, not a bug: say so with 503. */
async function outageResponse(request: Request): Promise<Response | null> {
  if (await databaseReachable()) return null;
  const headers = { "Retry-After": "30" };
  if (new URL(request.url).pathname.startsWith("/api/")) {
    return Response.json({ error: "The database is unavailable; try again shortly." }, { status: 503, headers });
  }
  return new Response(UNAVAILABLE_PAGE, { status: 503, headers: { ...headers, "Content-Type": "text/html; charset=utf-8" } });
}

/** The security headers, and the recent-write cookie when given, on a response. */
function withHeaders(response: Response, setCookie?: string): Response {
  const apply = (headers: Headers) => {
    for (const [k, v] of Object.entries(SECURITY_HEADERS)) if (!headers.has(k)) headers.set(k, v);
    if (setCookie) headers.append("Set-Cookie", setCookie);
  };
  try {
    apply(response.headers);
    return response;
  } catch {
    // Immutable headers (e.g. a fetched response): copy into a new Response.
    const copy = new Response(response.body, response);
    apply(copy.headers);
    return copy;
  }
}

function log(entry: Record<string, unknown>) {
  if (process.env.TILTHMARK_QUIET_LOGS === "1") return;
  process.stdout.write(`${JSON.stringify({ time: new Date().toISOString(), ...entry })}\n`);
}

export async function guardRequest(request: Request, next: () => Promise<Response>): Promise<Response> {
  const started = performance.now();
  const path = new URL(request.url).pathname;
  const facts: RequestFacts = { userId: null };
  let response: Response;
  if (crossOriginWrite(request)) {
    response = new Response("Refused: this form was sent from another site.", { status: 403, headers: { "Content-Type": "text/plain; charset=utf-8" } });
  } else if (oversizedForm(request, path)) {
    await drainBody(request);
    response = new Response("Refused: this form is larger than 1 MB. Lab files go through Lab intake.", { status: 413, headers: { "Content-Type": "text/plain; charset=utf-8" } });
  } else {
    response = await requestFacts.run(facts, next);
    if (response.status === 500) response = (await outageResponse(request)) ?? response;
    await drainBody(request);
  }
  // Whoever just wrote reads past the response cache for a few seconds.
  response = withHeaders(response, SAFE_METHODS.has(request.method) ? undefined : recentWriteCookie());
  log({ level: response.status >= 500 ? "error" : "info", method: request.method, path, status: response.status, ms: Math.round(performance.now() - started), userId: facts.userId, cache: facts.cache });
  return response;
}
