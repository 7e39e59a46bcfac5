// React Router's Node entry, with one addition: every HTML document gets a fresh nonce, given to
// React Router's inline scripts and named in the document's Content-Security-Policy, so the policy
// needs no 'unsafe-inline' for scripts. Single-fetch (.data) answers get the headers too, in
// handleDataRequest: one for a path no route matches skips the root middleware.
import { randomBytes } from "node:crypto";
import { PassThrough } from "node:stream";
import { createReadableStreamFromReadable } from "@react-router/node";
import { isbot } from "isbot";
import type { RenderToPipeableStreamOptions } from "react-dom/server";
import { renderToPipeableStream } from "react-dom/server";
import type { EntryContext, HandleDataRequestFunction } from "react-router";
import { ServerRouter } from "react-router";
import { securityHeaders } from "./.server/http-guard";

export const streamTimeout = 5_000;

/**
 * Every single-fetch answer, matched or not: the security headers it does not carry yet (a matched
 * route's already came from the root middleware). Data answers hold no scripts, so no nonce.
 */
export const handleDataRequest: HandleDataRequestFunction = (response) => {
  const missing = Object.entries(securityHeaders()).filter(([name]) => !response.headers.has(name));
  if (missing.length === 0) return response;
  try {
    for (const [name, value] of missing) response.headers.set(name, value);
    return response;
  } catch {
    // Immutable headers (a response passed through from fetch): copy into a new Response.
    const copy = new Response(response.body, response);
    for (const [name, value] of missing) copy.headers.set(name, value);
    return copy;
  }
};

export default function handleRequest(request: Request, responseStatusCode: number, responseHeaders: Headers, routerContext: EntryContext) {
  if (request.method.toUpperCase() === "HEAD") {
    return new Response(null, { status: responseStatusCode, headers: responseHeaders });
  }
  const nonce = randomBytes(16).toString("base64");
  for (const [name, value] of Object.entries(securityHeaders(nonce))) responseHeaders.set(name, value);

  return new Promise<Response>((resolve, reject) => {
    let shellRendered = false;
    const userAgent = request.headers.get("user-agent");
    // Crawlers (and SPA mode) wait for all content; browsers get the shell as soon as it is ready.
    const readyOption: keyof RenderToPipeableStreamOptions = (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? "onAllReady" : "onShellReady";
    let timeoutId: ReturnType<typeof setTimeout> | undefined = setTimeout(() => abort(), streamTimeout + 1000);

    const { pipe, abort } = renderToPipeableStream(<ServerRouter context={routerContext} url={request.url} nonce={nonce} />, {
      nonce,
      [readyOption]() {
        shellRendered = true;
        const body = new PassThrough({
          final(callback) {
            clearTimeout(timeoutId);
            timeoutId = undefined;
            callback();
          },
        });
        responseHeaders.set("Content-Type", "text/html");
        pipe(body);
        resolve(new Response(createReadableStreamFromReadable(body), { headers: responseHeaders, status: responseStatusCode }));
      },
      onShellError(error: unknown) {
        reject(error);
      },
      onError(error: unknown) {
        responseStatusCode = 500;
        // Errors while rendering the shell reject and are logged by React Router itself.
        if (shellRendered) console.error(error);
      },
    });
  });
}
