/**
 * The root middleware's work, on every request: refuse cross-site writes (CSRF), keep the session
 * cookie in step with the database, and keep signed-in answers out of shared caches.
 */
import { data, type MiddlewareFunction } from "react-router";
import { CROSS_ORIGIN_REFUSAL } from "~/lib/auth/cross-origin";
import { isSafeMethod, isSameOriginRequest } from "~/server/http.server";
import { strictTransportSecurity } from "~/server/security-headers.server";
import { apiErrorResponse, isApiRequest } from "./api-errors.server";
import { readBearerToken } from "./api-tokens.server";
import { getSession } from "./access.server";
import { SESSION_COOKIE, blankSessionCookie, readCookie, sessionCookie } from "./session.server";

/**
 * A write is accepted when it comes from our own pages, or when it is an API call with a personal token:
 * such a call carries no cookie, so another site cannot make a browser send it on someone's behalf.
 */
function isAllowedWrite(request: Request): boolean {
  if (isSafeMethod(request.method)) return true;
  if (isApiRequest(request) && readBearerToken(request)) return true;
  return isSameOriginRequest(request);
}

export const requestGuard: MiddlewareFunction<Response> = async ({ request, context }, next) => {
  if (!isAllowedWrite(request)) {
    if (isApiRequest(request))
      return apiErrorResponse(403, "cross_origin", "Requests that change data must come from Benchpost's own pages.");
    throw data(CROSS_ORIGIN_REFUSAL, { status: 403 });
  }
  const hadCookie = readCookie(request, SESSION_COOKIE) !== null;
  const validation = await getSession({ request, context });

  const response = await next();

  // An action that signed in or out has set the cookie itself; it knows better than the start of the request.
  const cookieSetByRoute = (response.headers.get("set-cookie") ?? "").includes(`${SESSION_COOKIE}=`);
  if (!cookieSetByRoute) {
    if (validation?.renewed)
      response.headers.append("Set-Cookie", sessionCookie(readCookie(request, SESSION_COOKIE)!, validation.session.expiresAt));
    else if (hadCookie && !validation) response.headers.append("Set-Cookie", blankSessionCookie());
  }
  if (validation || cookieSetByRoute) response.headers.set("Cache-Control", "private, no-store");
  response.headers.set("X-Content-Type-Options", "nosniff");
  const hsts = strictTransportSecurity();
  if (hsts) response.headers.set("Strict-Transport-Security", hsts);
  return response;
};
