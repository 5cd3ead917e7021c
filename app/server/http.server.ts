/**
 * What the server needs to know about an incoming request beyond its route: where it came from and
 * whether it was sent by our own pages.
 */
import { isIP } from "node:net";
import { data } from "react-router";
import type { z } from "zod";
import { apiErrorResponse, isApiRequest } from "~/server/auth/api-errors.server";
import { appUrl, isProduction } from "~/server/config.server";
import { environment } from "~/server/env.server";
import { logger } from "~/server/log.server";

/**
 * The client's address. The Request does not carry the socket address (only the load context does), so it
 * is read from X-Forwarded-For, and only when TRUST_PROXY=1 says a proxy of ours sets that header:
 * the right-most entry is the one our proxy appended, and the only one a client cannot forge.
 * Without a trusted proxy the address is unknown, and the per-address rate limits are skipped (the
 * per-account ones still hold); production says so once in the log.
 */
let warnedAboutProxy = false;
export function clientIp(request: Request): string | null {
  if (!environment().TRUST_PROXY) {
    if (isProduction() && !warnedAboutProxy) {
      warnedAboutProxy = true;
      logger.warn("TRUST_PROXY=0: client addresses are unknown, so sign-in is rate-limited per account only.");
    }
    return null;
  }
  const forwarded = request.headers.get("x-forwarded-for")?.split(",").pop()?.trim();
  return forwarded && isIP(forwarded) ? forwarded : null;
}

const safeMethods = new Set(["GET", "HEAD", "OPTIONS"]);

export function isSafeMethod(method: string): boolean {
  return safeMethods.has(method.toUpperCase());
}

/**
 * True when the request was sent from our own pages: its Origin is the app's, or, for the older
 * browsers that omit Origin, Sec-Fetch-Site says same-origin. Anything else (no header at all
 * included) is treated as cross-site.
 */
export function isSameOriginRequest(request: Request): boolean {
  const origin = request.headers.get("origin");
  if (origin) return origin === new URL(appUrl()).origin;
  return request.headers.get("sec-fetch-site") === "same-origin";
}

/**
 * A path on this site to go to after signing in; anything else falls back to "/". Browsers drop tabs and
 * line breaks from a Location and read a backslash as a slash, so `/<tab>/evil.example` or
 * `/<backslash>evil.example` would become `//evil.example`, another site: any control character or
 * backslash is refused, as is a leading `//`.
 */
export function safeRedirectPath(target: FormDataEntryValue | string | null | undefined, fallback = "/"): string {
  if (typeof target !== "string" || !target.startsWith("/") || target.startsWith("//") || /[\p{Cc}\\]/u.test(target)) return fallback;
  return target;
}

/**
 * A page's search parameters, checked against its one schema. An empty value (a blank field of a GET
 * form) counts as not given. A URL the schema refuses is answered 400: the error page for pages, the
 * API's error shape, with the parameters at fault, under /api/.
 */
export function readSearchParams<Schema extends z.ZodType>(request: Request, schema: Schema): z.output<Schema> {
  const given = [...new URL(request.url).searchParams].filter(([, value]) => value !== "");
  const parsed = schema.safeParse(Object.fromEntries(given));
  if (parsed.success) return parsed.data;
  const issues = parsed.error.issues.map((issue) => ({
    path: issue.path.map((key) => (typeof key === "number" ? key : String(key))),
    message: issue.message,
  }));
  if (isApiRequest(request))
    throw apiErrorResponse(400, "invalid_query", "The query string has a value this address does not take; `issues` names it.", issues);
  throw data(`Search parameters refused: ${issues.map((issue) => issue.path.join(".")).join(", ")}`, { status: 400 });
}
