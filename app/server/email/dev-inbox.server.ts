/**
 * The development inbox: what the local mail catcher received, and previews of every template. It shows
 * sign-in links and reset tokens, so it exists only in demo builds (app/routes.ts), answers only to this
 * machine (the socket's address is loopback; a proxy on this machine would defeat that, so the demo is
 * never put behind one), and is closed whenever real mail goes out.
 */
import { arrayContains, desc, eq } from "drizzle-orm";
import { type RouterContextProvider, data } from "react-router";
import { caughtEmails } from "~/db/schema";
import { db } from "~/server/db.server";
import { isLoopbackAddress } from "~/server/load-context.server";
import { sendsRealMail } from "./email-transport.server";

export function devInboxAllowed(context: Readonly<RouterContextProvider>): boolean {
  return !sendsRealMail() && isLoopbackAddress(context.remoteAddress);
}

/** A 404 rather than a 403: where the inbox is closed, it does not exist. */
export function requireDevInbox(context: Readonly<RouterContextProvider>): void {
  if (!devInboxAllowed(context)) throw data("Not found", { status: 404 });
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
