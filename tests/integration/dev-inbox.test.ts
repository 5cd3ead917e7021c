/**
 * The development inbox answers only to this machine. Its loaders read the socket's address from the
 * load context our web server gives (scripts/web.ts); any other address, or none, gets a 404, and so
 * does everyone once real mail goes out. The foreign addresses are from the documentation ranges
 * (RFC 5737, RFC 3849), never this machine's own.
 */
import { afterEach, beforeAll, describe, expect, it } from "vitest";
import { loader as emailsLoader } from "~/routes/api/dev.emails";
import { loader as inboxLoader } from "~/routes/dev.inbox";
import { caughtEmails } from "~/db/schema";
import { db } from "~/server/db.server";
import { loadContextFor } from "~/server/load-context.server";
import { appRequest, createAppHandler } from "../support/app-requests";

const to = "reset.reader@example.org";
const resetLink = "http://localhost:3000/reset-password/secret-token";
const foreign = ["192.0.2.10", "::ffff:192.0.2.10", "2001:db8::7"];
const local = ["127.0.0.1", "::1", "::ffff:127.0.0.1"];

const ask = (loader: typeof emailsLoader | typeof inboxLoader, path: string, remoteAddress: string | undefined) =>
  loader({ request: new Request(`http://localhost${path}`), params: {}, context: loadContextFor(remoteAddress) } as never);

beforeAll(async () => {
  delete process.env.RESEND_API_KEY;
  await db.insert(caughtEmails).values({
    fromAddress: "no-reply@benchpost.localhost",
    toAddresses: [to],
    subject: "Choose a new Benchpost password",
    text: `Open ${resetLink}`,
    headers: {},
  });
});
afterEach(() => {
  delete process.env.RESEND_API_KEY;
});

describe("development inbox", () => {
  it.each(local)("shows the caught mail to %s", async (address) => {
    const caught = (await ask(emailsLoader, `/api/dev/emails?to=${to}`, address)) as { emails: { links: string[] }[] };
    expect(caught.emails.map((email) => email.links)).toEqual([[resetLink]]);
    const page = (await ask(inboxLoader, "/dev/inbox", address)) as { emails: { subject: string }[] };
    expect(page.emails.map((email) => email.subject)).toContain("Choose a new Benchpost password");
  });

  it.each([...foreign, undefined])("does not exist for %s", async (address) => {
    await expect(ask(emailsLoader, `/api/dev/emails?to=${to}`, address)).rejects.toMatchObject({ init: { status: 404 } });
    await expect(ask(inboxLoader, "/dev/inbox", address)).rejects.toMatchObject({ init: { status: 404 } });
  });

  it("does not exist, even for this machine, when real mail goes out", async () => {
    process.env.RESEND_API_KEY = "re_live_key";
    await expect(ask(emailsLoader, `/api/dev/emails?to=${to}`, "127.0.0.1")).rejects.toMatchObject({ init: { status: 404 } });
  });

  it("reads the address the server passes to the built app's request handler", async () => {
    const fromAfar = await (await createAppHandler({ remoteAddress: "192.0.2.10" }))(appRequest(`/api/dev/emails?to=${to}`));
    expect(fromAfar.status).toBe(404);
    const fromHere = await (await createAppHandler({ remoteAddress: "::1" }))(appRequest(`/api/dev/emails?to=${to}`));
    expect(fromHere.status).toBe(200);
    expect(((await fromHere.json()) as { emails: unknown[] }).emails).toHaveLength(1);
  });
});
