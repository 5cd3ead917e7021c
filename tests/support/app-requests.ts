/**
 * Requests to the built app, in process: `createRequestHandler(build, "production")` from React Router,
 * on the test file's own database copy (DATABASE_URL), with real session cookies, and the load context
 * our web server gives (scripts/web.ts): by default a request from this machine.
 */
import { createRequestHandler, type ServerBuild } from "react-router";
import { appUrl } from "~/server/config.server";
import { db } from "~/server/db.server";
import { loadContextFor } from "~/server/load-context.server";
import { SESSION_COOKIE, createSession } from "~/server/auth/session.server";

export type AppHandler = (request: Request) => Promise<Response>;

export async function loadBuild(): Promise<ServerBuild> {
  // @ts-expect-error The build has no type declarations; `npm test` (or `npx react-router build`) makes it.
  return (await import("../../build/server/index.js")) as ServerBuild;
}

export async function createAppHandler({ remoteAddress = "127.0.0.1" }: { remoteAddress?: string } = {}): Promise<AppHandler> {
  const handler = createRequestHandler(await loadBuild(), "production");
  return (request) => handler(request, loadContextFor(remoteAddress));
}

export const appOrigin = () => new URL(appUrl()).origin;

export type AppRequestOptions = {
  method?: string;
  cookie?: string | null;
  /** Form fields; an array sends the field once per value, as repeated inputs do. */
  form?: Record<string, string | string[]>;
  headers?: Record<string, string>;
  /** The Origin header; the app's own unless given (null leaves it out). */
  origin?: string | null;
  ip?: string;
};

export function appRequest(path: string, options: AppRequestOptions = {}): Request {
  const method = options.method ?? (options.form ? "POST" : "GET");
  const headers = new Headers(options.headers);
  if (options.cookie) headers.set("Cookie", options.cookie);
  if (method !== "GET" && method !== "HEAD") {
    const origin = options.origin === undefined ? appOrigin() : options.origin;
    if (origin) headers.set("Origin", origin);
  }
  if (options.ip) headers.set("X-Forwarded-For", options.ip);
  const body = options.form
    ? new URLSearchParams(Object.entries(options.form).flatMap(([name, value]) => [value].flat().map((one) => [name, one])))
    : undefined;
  return new Request(new URL(path, appOrigin()), { method, headers, body, redirect: "manual" });
}

/** A real session for the user, as the Cookie header a browser would send. */
export async function sessionCookieFor(userId: string): Promise<string> {
  const { token } = await createSession(db, userId, new Request(appOrigin()));
  return `${SESSION_COOKIE}=${token}`;
}

/** The session token in a response's Set-Cookie, or null. */
export function sessionTokenFrom(response: Response): string | null {
  for (const cookie of response.headers.getSetCookie()) {
    const match = cookie.match(new RegExp(`^${SESSION_COOKIE}=([^;]*)`));
    if (match) return match[1] || null;
  }
  return null;
}
