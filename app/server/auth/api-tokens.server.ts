/**
 * Personal API tokens for staff: created with a name, shown once, stored as SHA-256, listed with
 * their last use, revoked by deleting them. Accepted as `Authorization: Bearer …` on /api/.
 */
import { and, desc, eq, exists, isNull, ne, not, sql } from "drizzle-orm";
import { apiTokens, courseMemberships, users } from "~/db/schema";
import { recordAudit } from "~/server/audit.server";
import { type Executor, db } from "~/server/db.server";
import type { SessionUser } from "./session.server";
import { generateToken, hashToken } from "./tokens.server";

/** A prefix that makes a leaked token recognisable to secret scanners and to people. */
const TOKEN_PREFIX = "bpt_";
/** Last use is written at most this often, so that a busy script does not write on every call. */
const LAST_USED_PRECISION_MS = 60_000;

export function readBearerToken(request: Request): string | null {
  const header = request.headers.get("authorization");
  const match = header?.match(/^Bearer\s+(\S+)\s*$/i);
  return match ? match[1] : header ? "" : null;
}

export async function authenticateApiToken(token: string): Promise<SessionUser | null> {
  if (!token.startsWith(TOKEN_PREFIX)) return null;
  const [row] = await db
    .select({
      tokenId: apiTokens.id,
      lastUsedAt: apiTokens.lastUsedAt,
      user: { id: users.id, email: users.email, name: users.name, mayCreateCourses: users.mayCreateCourses },
    })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(eq(apiTokens.tokenHash, hashToken(token)));
  if (!row) return null;
  if (!row.lastUsedAt || Date.now() - row.lastUsedAt.getTime() > LAST_USED_PRECISION_MS) {
    await db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, row.tokenId));
  }
  return row.user;
}

/** The user's active memberships that are not a student's: they teach or assist in those courses. */
const staffMemberships = (userId: string) =>
  db
    .select({ found: sql`1` })
    .from(courseMemberships)
    .where(and(eq(courseMemberships.userId, userId), ne(courseMemberships.role, "student"), isNull(courseMemberships.removedAt)));

const isCourseStaff = (userId: string) => exists(staffMemberships(userId));

/** Tokens are for staff: people who may open courses, or who teach or assist in one. */
export async function mayHaveApiTokens(user: SessionUser): Promise<boolean> {
  if (user.mayCreateCourses) return true;
  const found = await staffMemberships(user.id).limit(1);
  return found.length > 0;
}

/**
 * Deletes the user's tokens once they are staff no more, in the transaction that ended their last staff
 * role (made a student, removed from the course): a token must not outlive the role it was given for.
 * One statement; nothing happens while the user is still staff somewhere.
 */
export async function revokeTokensOfFormerStaff(tx: Executor, userId: string, actorId: string, request?: Request): Promise<void> {
  const mayCreateCourses = tx
    .select({ found: sql`1` })
    .from(users)
    .where(and(eq(users.id, userId), eq(users.mayCreateCourses, true)));
  const revoked = await tx
    .delete(apiTokens)
    .where(and(eq(apiTokens.userId, userId), not(exists(mayCreateCourses)), not(isCourseStaff(userId))))
    .returning({ id: apiTokens.id, name: apiTokens.name });
  await recordAudit(
    tx,
    revoked.map((token) => ({
      action: "auth.api_token_revoked" as const,
      actorId,
      subject: `api_token:${token.id}`,
      detail: { name: token.name, reason: "no longer staff", userId },
      request,
    })),
  );
}

export function listApiTokens(userId: string) {
  return db
    .select({ id: apiTokens.id, name: apiTokens.name, createdAt: apiTokens.createdAt, lastUsedAt: apiTokens.lastUsedAt })
    .from(apiTokens)
    .where(eq(apiTokens.userId, userId))
    .orderBy(desc(apiTokens.createdAt));
}

/** Returns the token itself, which is never stored and cannot be shown again. */
export async function createApiToken(user: SessionUser, name: string, request: Request): Promise<{ id: string; token: string }> {
  const token = TOKEN_PREFIX + generateToken(32);
  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(apiTokens)
      .values({ userId: user.id, name, tokenHash: hashToken(token) })
      .returning({ id: apiTokens.id });
    await recordAudit(tx, {
      action: "auth.api_token_created",
      actorId: user.id,
      subject: `api_token:${row.id}`,
      detail: { name },
      request,
    });
    return { id: row.id, token };
  });
}

export async function revokeApiToken(user: SessionUser, tokenId: string, request: Request): Promise<boolean> {
  return db.transaction(async (tx) => {
    const deleted = await tx
      .delete(apiTokens)
      .where(and(eq(apiTokens.id, tokenId), eq(apiTokens.userId, user.id)))
      .returning({ id: apiTokens.id, name: apiTokens.name });
    if (deleted.length === 0) return false;
    await recordAudit(tx, {
      action: "auth.api_token_revoked",
      actorId: user.id,
      subject: `api_token:${tokenId}`,
      detail: { name: deleted[0].name },
      request,
    });
    return true;
  });
}
