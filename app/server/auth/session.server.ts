/**
 * Database sessions built by hand on @oslojs, in the style of Lucia's guide: 30 days, extended when fewer
 * than 15 remain, expired rows deleted when met. A request's session is looked up once and shared
 * by the middleware and every loader of that request.
 */
import { and, eq, ne, sql } from "drizzle-orm";
import { sessions, users } from "~/db/schema";
import { isProduction } from "~/server/config.server";
import { db, type Executor } from "~/server/db.server";
import { clientIp } from "~/server/http.server";
import { preparedStatement } from "~/server/prepared-statements.server";
import { generateToken, hashToken } from "./tokens.server";

const DAY_MS = 24 * 60 * 60 * 1000;
export const SESSION_LIFETIME_MS = 30 * DAY_MS;
export const SESSION_RENEW_WITHIN_MS = 15 * DAY_MS;
export const SESSION_COOKIE = "benchpost_session";

export type SessionUser = { id: string; email: string; name: string; mayCreateCourses: boolean };
export type Session = { id: string; userId: string; expiresAt: Date };
export type SessionValidation = { session: Session; user: SessionUser; renewed: boolean };

export async function createSession(executor: Executor, userId: string, request: Request): Promise<{ token: string; session: Session }> {
  const token = generateToken();
  const session = { id: hashToken(token), userId, expiresAt: new Date(Date.now() + SESSION_LIFETIME_MS) };
  await executor.insert(sessions).values({
    ...session,
    userAgent: request.headers.get("user-agent")?.slice(0, 300) ?? null,
    ip: clientIp(request),
  });
  return { token, session };
}

/** Every request with a cookie asks this first: built once, and a named statement where the switch allows. */
const sessionLookup = preparedStatement("session_lookup", (name) =>
  db
    .select({
      session: { id: sessions.id, userId: sessions.userId, expiresAt: sessions.expiresAt },
      user: { id: users.id, email: users.email, name: users.name, mayCreateCourses: users.mayCreateCourses },
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .where(eq(sessions.id, sql.placeholder("sessionId")))
    .prepare(name),
);

export async function validateSessionToken(token: string, now = new Date()): Promise<SessionValidation | null> {
  const sessionId = hashToken(token);
  const [row] = await sessionLookup().execute({ sessionId });
  if (!row) return null;
  if (now.getTime() >= row.session.expiresAt.getTime()) {
    await db.delete(sessions).where(eq(sessions.id, sessionId));
    return null;
  }
  let renewed = false;
  if (row.session.expiresAt.getTime() - now.getTime() < SESSION_RENEW_WITHIN_MS) {
    row.session.expiresAt = new Date(now.getTime() + SESSION_LIFETIME_MS);
    await db.update(sessions).set({ expiresAt: row.session.expiresAt }).where(eq(sessions.id, sessionId));
    renewed = true;
  }
  return { ...row, renewed };
}

export async function invalidateSession(executor: Executor, sessionId: string): Promise<void> {
  await executor.delete(sessions).where(eq(sessions.id, sessionId));
}

/** Ends every session of the user, except (when given) the one making the request. */
export async function invalidateUserSessions(executor: Executor, userId: string, keepSessionId?: string): Promise<void> {
  await executor
    .delete(sessions)
    .where(keepSessionId ? and(eq(sessions.userId, userId), ne(sessions.id, keepSessionId)) : eq(sessions.userId, userId));
}

export function listUserSessions(userId: string) {
  return db
    .select({
      id: sessions.id,
      createdAt: sessions.createdAt,
      expiresAt: sessions.expiresAt,
      userAgent: sessions.userAgent,
      ip: sessions.ip,
    })
    .from(sessions)
    .where(eq(sessions.userId, userId))
    .orderBy(sessions.createdAt);
}

// --- cookies -----------------------------------------------------------------------------------

export function readCookie(request: Request, name: string): string | null {
  for (const part of (request.headers.get("cookie") ?? "").split(";")) {
    const separator = part.indexOf("=");
    if (separator > 0 && part.slice(0, separator).trim() === name) return part.slice(separator + 1).trim() || null;
  }
  return null;
}

function cookieAttributes(expires: Date): string {
  return `HttpOnly; SameSite=Lax; Path=/; Expires=${expires.toUTCString()}${isProduction() ? "; Secure" : ""}`;
}

export function sessionCookie(token: string, expiresAt: Date): string {
  return `${SESSION_COOKIE}=${token}; ${cookieAttributes(expiresAt)}`;
}

export function blankSessionCookie(): string {
  return `${SESSION_COOKIE}=; ${cookieAttributes(new Date(0))}; Max-Age=0`;
}

/** The session a request's cookie names, or null. The router context keeps it for the rest of the request (see access.server). */
export function readRequestSession(request: Request): Promise<SessionValidation | null> {
  const token = readCookie(request, SESSION_COOKIE);
  return token ? validateSessionToken(token) : Promise.resolve(null);
}

/** Ends one of the user's own sessions (from the account page); false when it was not theirs. */
export async function endOwnSession(executor: Executor, userId: string, sessionId: string): Promise<boolean> {
  const deleted = await executor
    .delete(sessions)
    .where(and(eq(sessions.id, sessionId), eq(sessions.userId, userId)))
    .returning({ id: sessions.id });
  return deleted.length > 0;
}
