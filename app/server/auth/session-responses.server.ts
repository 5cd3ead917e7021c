/**
 * Responses that start or end the browser's session. Starting one also ends the session the
 * request arrived with, so that every sign-in gets a fresh session.
 */
import { redirect } from "react-router";
import { db } from "~/server/db.server";
import { getSession, type RequestScope } from "./access.server";
import { blankSessionCookie, invalidateSession, sessionCookie, type Session } from "./session.server";

export async function redirectWithNewSession(
  scope: RequestScope,
  to: string,
  started: { token: string; session: Session },
): Promise<Response> {
  const previous = await getSession(scope);
  if (previous && previous.session.id !== started.session.id) await invalidateSession(db, previous.session.id);
  return redirect(to, { headers: { "Set-Cookie": sessionCookie(started.token, started.session.expiresAt) } });
}

export function redirectSignedOut(to: string): Response {
  return redirect(to, { headers: { "Set-Cookie": blankSessionCookie() } });
}

/** Carries Retry-After to the page; the route's `headers` export passes it on. */
export function retryAfterHeaders(seconds: number): HeadersInit {
  return { "Retry-After": String(seconds) };
}

export function describeWait(seconds: number): string {
  const minutes = Math.ceil(seconds / 60);
  return minutes <= 1 ? "a minute" : `${minutes} minutes`;
}
