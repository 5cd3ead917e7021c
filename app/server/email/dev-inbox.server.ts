/**
 * The development inbox: what the local mail catcher received, and previews of every template. It shows
 * sign-in links and invitation tokens, so it is closed whenever real mail goes out, and otherwise open
 * only to signed-in staff (outside production) or with BENCHPOST_DEV_INBOX=1 (the run command and the
 * test harness set it: they serve the production build, so NODE_ENV alone cannot tell them apart).
 */
import { and, arrayContains, desc, eq, sql } from "drizzle-orm";
import { data } from "react-router";
import { caughtEmails, courseMemberships } from "~/db/schema";
import { getOptionalUser } from "~/server/auth/access.server";
import { isProduction } from "~/server/config.server";
import { db } from "~/server/db.server";
import { sendsRealMail } from "./email-transport.server";

async function isSignedInStaff(request: Request): Promise<boolean> {
  const user = await getOptionalUser(request);
  if (!user) return false;
  const staffMembership = await db.query.courseMemberships.findFirst({
    columns: { id: true },
    where: and(eq(courseMemberships.userId, user.id), sql`${courseMemberships.role} in ('instructor', 'ta')`, sql`${courseMemberships.removedAt} is null`),
  });
  return Boolean(staffMembership);
}

export async function devInboxAllowed(request: Request): Promise<boolean> {
  if (sendsRealMail()) return false;
  if (process.env.BENCHPOST_DEV_INBOX === "1") return true;
  return !isProduction() && (await isSignedInStaff(request));
}

/** A 404 rather than a 403: where the inbox is closed, it does not exist. */
export async function requireDevInbox(request: Request): Promise<void> {
  if (!(await devInboxAllowed(request))) throw data("Not found", { status: 404 });
}

export type CaughtEmail = typeof caughtEmails.$inferSelect;

export function listCaughtEmails(options: { to?: string; limit?: number } = {}): Promise<CaughtEmail[]> {
  return db
    .select()
    .from(caughtEmails)
    .where(options.to ? arrayContains(caughtEmails.toAddresses, [options.to.toLowerCase()]) : undefined)
    .orderBy(desc(caughtEmails.receivedAt))
    .limit(options.limit ?? 100);
}

export async function getCaughtEmail(id: string): Promise<CaughtEmail | undefined> {
  const [email] = await db.select().from(caughtEmails).where(eq(caughtEmails.id, id));
  return email;
}

/** The links in a message's plain text, in order: what a test clicks to follow a sign-in or invitation. */
export function linksIn(text: string | null): string[] {
  return text?.match(/https?:\/\/[^\s<>"')\]]+/g) ?? [];
}
