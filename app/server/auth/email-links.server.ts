/**
 * E-mailed sign-in and password-reset links. The token lives only in the e-mail; the row holds its
 * SHA-256. A link is used by deleting its row (`delete … returning`), so two clicks racing each other
 * cannot both succeed.
 */
import { and, eq, sql } from "drizzle-orm";
import { emailLinks, users } from "~/db/schema";
import type { Executor } from "~/server/db.server";
import { generateToken, hashToken } from "./tokens.server";

export type EmailLinkPurpose = "sign_in" | "password_reset";

export const emailLinkLifetimeMinutes: Record<EmailLinkPurpose, number> = { sign_in: 15, password_reset: 60 };

/**
 * Writes a link for the account of `email`, in one statement that finds the account too. An address with
 * no account gets a token all the same, but no row: the same work either way, so that timing does not
 * tell whether an account exists.
 */
export async function createEmailLink(
  executor: Executor,
  email: string,
  purpose: EmailLinkPurpose,
): Promise<{ token: string; user: { id: string; name: string } | null }> {
  const token = generateToken();
  const expiresAt = new Date(Date.now() + emailLinkLifetimeMinutes[purpose] * 60_000);
  const account = executor
    .$with("account")
    .as(executor.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, email)));
  // An insert … select names every column of the table, in the table's order.
  const link = executor.$with("link").as(
    executor
      .insert(emailLinks)
      .select(
        executor
          .select({
            id: sql<string>`${hashToken(token)}`.as("id"),
            userId: account.id,
            purpose: sql<EmailLinkPurpose>`${purpose}`.as("purpose"),
            expiresAt: sql<Date>`${expiresAt.toISOString()}::timestamptz`.as("expires_at"),
            createdAt: sql<Date>`now()`.as("created_at"),
          })
          .from(account),
      )
      .returning({ id: emailLinks.id }),
  );
  const [user] = await executor.with(account, link).select().from(account);
  return { token, user: user ?? null };
}

/** Uses up the link and returns its user, or null when it is unknown, used, expired or for another purpose. */
export async function consumeEmailLink(executor: Executor, token: string, purpose: EmailLinkPurpose): Promise<string | null> {
  const [row] = await executor
    .delete(emailLinks)
    .where(and(eq(emailLinks.id, hashToken(token)), eq(emailLinks.purpose, purpose)))
    .returning({ userId: emailLinks.userId, expiresAt: emailLinks.expiresAt });
  if (!row || row.expiresAt.getTime() <= Date.now()) return null;
  return row.userId;
}

/** Whether a link is still good, without using it: for the page that asks "continue?". */
export async function peekEmailLink(executor: Executor, token: string, purpose: EmailLinkPurpose): Promise<boolean> {
  const [row] = await executor
    .select({ expiresAt: emailLinks.expiresAt })
    .from(emailLinks)
    .where(and(eq(emailLinks.id, hashToken(token)), eq(emailLinks.purpose, purpose)));
  return Boolean(row && row.expiresAt.getTime() > Date.now());
}

/** Ends every outstanding link of the user, whatever its purpose: a new password must not be bypassed by an older e-mail. */
export async function deleteUserEmailLinks(executor: Executor, userId: string): Promise<void> {
  await executor.delete(emailLinks).where(eq(emailLinks.userId, userId));
}
