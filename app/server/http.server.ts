/**
 * What the server needs to know about an incoming request beyond its route: where it came from and
 * whether it was sent by our own pages.
 */
import { isIP } from "node:net";
import { appUrl, isProduction } from "~/server/config.server";
import { environment } from "~/server/env.server";

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
      console.warn("TRUST_PROXY=0: client addresses are unknown, so sign-in is rate-limited per account only.");
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

/** A path on this site to go to after signing in; anything else (other hosts, `//…`) falls back to "/". */
export function safeRedirectPath(target: FormDataEntryValue | string | null | undefined, fallback = "/"): string {
  if (typeof target !== "string" || !target.startsWith("/") || target.startsWith("//") || target.startsWith("/\\")) return fallback;
  return target;
}
