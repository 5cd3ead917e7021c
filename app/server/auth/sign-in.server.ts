/**
 * Signing in and out, e-mailed links, password changes and resets. Every success starts a new
 * session; a password change or reset ends all the others and every e-mailed link. Answers never say
 * whether an account exists.
 */
import { eq } from "drizzle-orm";
import { users } from "~/db/schema";
import { type AuditInput, recordAudit } from "~/server/audit.server";
import { allowSignUp, appUrl } from "~/server/config.server";
import { db, type Executor } from "~/server/db.server";
import { sendEmail } from "~/server/email/send-email.server";
import { clientIp } from "~/server/http.server";
import {
  consumeEmailLink,
  createEmailLink,
  deleteUserEmailLinks,
  emailLinkLifetimeMinutes,
  type EmailLinkPurpose,
} from "./email-links.server";
import { hashPassword, verifyAgainstDecoy, verifyPassword } from "./password.server";
import { consume, firstLimited, refund, type LimitCheck } from "./rate-limit.server";
import { createSession, invalidateSession, invalidateUserSessions, type Session } from "./session.server";

export type NewSession = { token: string; session: Session; userId: string };
type Limited = Extract<LimitCheck, { limited: true }>;

export const normaliseEmail = (email: string) => email.trim().toLowerCase();

async function findUserByEmail(executor: Executor, email: string) {
  const [user] = await executor
    .select()
    .from(users)
    .where(eq(users.email, normaliseEmail(email)));
  return user;
}

async function startSession(executor: Executor, userId: string, request: Request, how: string): Promise<NewSession> {
  const { token, session } = await createSession(executor, userId, request);
  await recordAudit(executor, { action: "auth.sign_in", actorId: userId, subject: `user:${userId}`, detail: { how }, request });
  return { token, session, userId };
}

export async function signInWithPassword(
  input: { email: string; password: string },
  request: Request,
): Promise<({ outcome: "signed-in" } & NewSession) | { outcome: "refused" } | ({ outcome: "limited" } & Limited)> {
  const email = normaliseEmail(input.email);
  const ip = clientIp(request);
  // The attempt is counted before the password is looked at, so however many arrive at once, at most the
  // limit's worth are checked; a limited attacker learns nothing more. A success gets its points back.
  const limit = firstLimited(await Promise.all([consume("sign-in-ip", ip), consume("sign-in-account", email)]));
  if (limit.limited) return { outcome: "limited", ...limit };

  const user = await findUserByEmail(db, email);
  const valid = user?.passwordHash ? await verifyPassword(user.passwordHash, input.password) : await verifyAgainstDecoy(input.password);
  if (!user || !valid) {
    await recordAudit(db, {
      action: "auth.sign_in_failed",
      actorId: user?.id ?? null,
      subject: user ? `user:${user.id}` : null,
      detail: { reason: user ? "wrong password" : "unknown account" },
      request,
    });
    return { outcome: "refused" };
  }
  await Promise.all([refund("sign-in-ip", ip), refund("sign-in-account", email)]);
  return { outcome: "signed-in", ...(await startSession(db, user.id, request, "password")) };
}

const linkTemplates = { sign_in: "sign-in-link", password_reset: "password-reset" } as const;
const linkPaths = { sign_in: "/sign-in/link", password_reset: "/reset-password" } as const;

/**
 * Sends a sign-in or reset link when the address has an account, and a notice saying there is none
 * otherwise; the answer is the same. Limited by address and by client, so that nobody can flood a mailbox.
 */
export async function requestEmailLink(
  purpose: EmailLinkPurpose,
  rawEmail: string,
  request: Request,
): Promise<{ outcome: "sent" } | ({ outcome: "limited" } & Limited)> {
  const email = normaliseEmail(rawEmail);
  const limit = firstLimited(await Promise.all([consume("email-link-address", email), consume("email-link-ip", clientIp(request))]));
  if (limit.limited) return { outcome: "limited", ...limit };
  await db.transaction((tx) => queueEmailLink(tx, purpose, email, request));
  return { outcome: "sent" };
}

/**
 * The link, or the "no account" notice, queued through the outbox. Both take the same statements (the
 * link's insert finds the account, see `createEmailLink`), so that how long the answer takes does not
 * tell whether the address has an account. `alsoRecord` joins the one audit insert.
 */
async function queueEmailLink(
  tx: Executor,
  purpose: EmailLinkPurpose,
  email: string,
  request: Request,
  alsoRecord: AuditInput[] = [],
): Promise<void> {
  const { token, user } = await createEmailLink(tx, email, purpose);
  await sendEmail(
    tx,
    user
      ? {
          to: email,
          toName: user.name,
          template: linkTemplates[purpose],
          props: { url: `${appUrl()}${linkPaths[purpose]}/${token}`, expiresInMinutes: emailLinkLifetimeMinutes[purpose] },
        }
      : { to: email, template: "no-account", props: { purpose, signUpUrl: allowSignUp() ? `${appUrl()}/sign-up` : null } },
  );
  await recordAudit(tx, [
    ...alsoRecord,
    {
      action: purpose === "sign_in" ? "auth.sign_in_link_requested" : "auth.password_reset_requested",
      actorId: user?.id ?? null,
      subject: user ? `user:${user.id}` : null,
      detail: user ? undefined : { reason: "unknown account" },
      request,
    },
  ]);
}

export async function signInWithEmailLink(token: string, request: Request): Promise<NewSession | null> {
  return db.transaction(async (tx) => {
    const userId = await consumeEmailLink(tx, token, "sign_in");
    return userId ? startSession(tx, userId, request, "e-mailed link") : null;
  });
}

/** Sets the new password and ends what the old one could have opened: every session and every e-mailed link. */
async function endCredentials(tx: Executor, userId: string, passwordHash: string): Promise<void> {
  await tx.update(users).set({ passwordHash }).where(eq(users.id, userId));
  await invalidateUserSessions(tx, userId);
  await deleteUserEmailLinks(tx, userId);
}

/** Sets the new password, ends every session and every other e-mailed link, and signs in afresh. */
export async function resetPasswordWithLink(token: string, newPassword: string, request: Request): Promise<NewSession | null> {
  const passwordHash = await hashPassword(newPassword);
  return db.transaction(async (tx) => {
    const userId = await consumeEmailLink(tx, token, "password_reset");
    if (!userId) return null;
    await endCredentials(tx, userId, passwordHash);
    await recordAudit(tx, { action: "auth.password_reset", actorId: userId, subject: `user:${userId}`, request });
    return startSession(tx, userId, request, "password reset");
  });
}

/** A signed-in change: the current password is asked for when there is one. Ends every session (this one included) and e-mailed link. */
export async function changePassword(
  userId: string,
  input: { currentPassword: string; newPassword: string },
  request: Request,
): Promise<NewSession | { outcome: "wrong-current-password" }> {
  const [user] = await db.select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, userId));
  if (user?.passwordHash && !(await verifyPassword(user.passwordHash, input.currentPassword))) return { outcome: "wrong-current-password" };
  const passwordHash = await hashPassword(input.newPassword);
  return db.transaction(async (tx) => {
    await endCredentials(tx, userId, passwordHash);
    await recordAudit(tx, { action: "auth.password_changed", actorId: userId, subject: `user:${userId}`, request });
    const { token, session } = await createSession(tx, userId, request);
    return { token, session, userId };
  });
}

export async function signOut(userId: string, sessionId: string, request: Request): Promise<void> {
  await db.transaction(async (tx) => {
    await invalidateSession(tx, sessionId);
    await recordAudit(tx, { action: "auth.sign_out", actorId: userId, subject: `user:${userId}`, request });
  });
}

export async function signOutEverywhere(userId: string, request: Request): Promise<void> {
  await db.transaction(async (tx) => {
    await invalidateUserSessions(tx, userId);
    await recordAudit(tx, { action: "auth.sign_out_everywhere", actorId: userId, subject: `user:${userId}`, request });
  });
}

/**
 * Open sign-up makes an account that may open courses (an instructor's), without a password: the
 * e-mailed sign-in link proves the address first, and a password can be chosen on the account page. An
 * address that has an account already gets a sign-in link to it, and the same answer, so that sign-up
 * does not tell who has an account (nor lets anyone claim an address they cannot read).
 */
export async function signUp(
  input: { name: string; email: string },
  request: Request,
): Promise<{ outcome: "sent" } | ({ outcome: "limited" } & Limited)> {
  const email = normaliseEmail(input.email);
  const limit = firstLimited(await Promise.all([consume("email-link-address", email), consume("email-link-ip", clientIp(request))]));
  if (limit.limited) return { outcome: "limited", ...limit };
  await db.transaction(async (tx) => {
    const [created] = await tx
      .insert(users)
      .values({ name: input.name, email, mayCreateCourses: true })
      .onConflictDoNothing()
      .returning({ id: users.id });
    const signedUp: AuditInput[] = created ? [{ action: "auth.sign_up", actorId: created.id, subject: `user:${created.id}`, request }] : [];
    await queueEmailLink(tx, "sign_in", email, request, signedUp);
  });
  return { outcome: "sent" };
}

export async function updateName(userId: string, name: string): Promise<void> {
  await db.update(users).set({ name }).where(eq(users.id, userId));
}

export async function hasPassword(userId: string): Promise<boolean> {
  const [user] = await db.select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, userId));
  return Boolean(user?.passwordHash);
}

/** An account that may open courses, made or promoted from the command line. */
export async function createInstructorAccount(executor: Executor, input: { email: string; name: string }): Promise<"created" | "promoted"> {
  const [created] = await executor
    .insert(users)
    .values({ email: normaliseEmail(input.email), name: input.name.trim(), mayCreateCourses: true })
    .onConflictDoNothing()
    .returning({ id: users.id });
  if (created) return "created";
  await executor
    .update(users)
    .set({ mayCreateCourses: true })
    .where(eq(users.email, normaliseEmail(input.email)));
  return "promoted";
}
