/**
 * React Router's Node entry, with a fresh CSP nonce per response for the router's inline scripts and
 * Benchpost's security headers on every HTML page, and the error log (a database outage is noted for
 * the 503 and logged in one line).
 */
import { PassThrough } from "node:stream";
import { createReadableStreamFromReadable } from "@react-router/node";
import { encodeBase64 } from "@oslojs/encoding";
import { isbot } from "isbot";
import type { RenderToPipeableStreamOptions } from "react-dom/server";
import { renderToPipeableStream } from "react-dom/server";
import { type EntryContext, type HandleErrorFunction, type RouterContextProvider, ServerRouter, isRouteErrorResponse } from "react-router";
import { NonceContext } from "~/components/nonce";
import { DATABASE_RETRY_AFTER_SECONDS, noteDatabaseOutage } from "~/server/database-outage.server";
import { logger } from "~/server/log.server";
import { setDocumentSecurityHeaders } from "~/server/security-headers.server";

export const streamTimeout = 5_000;

function createNonce(): string {
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  return encodeBase64(bytes);
}

export default function handleRequest(
  request: Request,
  responseStatusCode: number,
  responseHeaders: Headers,
  routerContext: EntryContext,
  loadContext: RouterContextProvider,
) {
  const nonce = createNonce();
  setDocumentSecurityHeaders(responseHeaders, nonce);
  // The 503 page is a database outage's (see database-outage.server.ts): tell clients when to come back.
  if (responseStatusCode === 503) responseHeaders.set("Retry-After", String(DATABASE_RETRY_AFTER_SECONDS));

  // https://httpwg.org/specs/rfc9110.html#HEAD
  if (request.method.toUpperCase() === "HEAD") {
    return new Response(null, { status: responseStatusCode, headers: responseHeaders });
  }

  return new Promise<Response>((resolve, reject) => {
    let shellRendered = false;
    const userAgent = request.headers.get("user-agent");
    // Bots and SPA-mode renders wait for all content, so that they get complete HTML.
    const readyOption: keyof RenderToPipeableStreamOptions =
      (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? "onAllReady" : "onShellReady";

    let timeoutId: ReturnType<typeof setTimeout> | undefined = setTimeout(() => abort(), streamTimeout + 1000);

    const { pipe, abort } = renderToPipeableStream(
      <NonceContext.Provider value={nonce}>
        <ServerRouter context={routerContext} url={request.url} nonce={nonce} />
      </NonceContext.Provider>,
      {
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
          // Errors before the shell is out are logged by React Router's document handler.
          if (shellRendered) logger.error({ err: error, requestId: loadContext.requestId }, "render failed");
        },
      },
    );
  });
}

/** React Router's default logging, except that an unreachable database is one line, not a stack per request. */
export const handleError: HandleErrorFunction = (error, { request, context }) => {
  if (noteDatabaseOutage(error, { request, context })) return;
  // A thrown 4xx/5xx response carries the original error, when there was one, on its private `error`.
  const cause = isRouteErrorResponse(error) ? (error as { error?: unknown }).error : undefined;
  if (!request.signal.aborted)
    logger.error({ err: cause ?? error, requestId: context.requestId, method: request.method }, "request failed");
};
