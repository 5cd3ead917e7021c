import { type LoaderFunctionArgs, data } from "react-router";
import { z } from "zod";
import { linksIn, listCaughtEmails, requireDevInbox } from "~/server/email/dev-inbox.server";

const query = z.object({ to: z.email().max(254) });

/**
 * For tests and scripts: the messages the mail catcher received for one address, newest first. Typed
 * without `./+types`: typegen sees this route only when it is run for a demo build.
 */
export async function loader({ request, context }: LoaderFunctionArgs) {
  requireDevInbox(context);
  const parsed = query.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  if (!parsed.success) return data({ error: "Give the recipient as ?to=<address>.", issues: parsed.error.issues }, { status: 400 });
  const emails = await listCaughtEmails({ to: parsed.data.to });
  return {
    emails: emails.map((email) => ({
      id: email.id,
      messageId: email.messageId,
      from: email.fromAddress,
      to: email.toAddresses,
      subject: email.subject,
      receivedAt: email.receivedAt.toISOString(),
      headers: email.headers,
      html: email.html,
      text: email.text,
      links: linksIn(email.text),
    })),
  };
}
