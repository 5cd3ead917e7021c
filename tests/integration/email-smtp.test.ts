import { sql } from "drizzle-orm";
import addressparser from "nodemailer/lib/addressparser";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loader as emailsLoader } from "~/routes/api/dev.emails";
import { caughtEmails } from "~/db/schema";
import { db } from "~/server/db.server";
import { ATTEMPT_LEASE_SECONDS, DeliveryInProgressError, deliverOutboxEmail } from "~/server/email/deliver-email.server";
import { type EmailTransport, smtpTransport } from "~/server/email/email-transport.server";
import { loadContextFor } from "~/server/load-context.server";
import { type MailCatcher, startMailCatcher } from "~/server/email/mail-catcher.server";
import { sendEmail } from "~/server/email/send-email.server";
import { type Worker, startWorker } from "~/server/jobs/worker.server";
import { outboxRow, signInMessage, waitFor } from "../support/email";

const FROM = "Benchpost <no-reply@benchpost.example>";
let catcher: MailCatcher;
const workers: Worker[] = [];
const firstWorkerDeliveries = { count: 0 };
/** The structured fields of each delivery's log line, by the message's line. */
const deliveryLines: { message: string; fields?: { queue: string; jobId: string } }[] = [];

/** Starts a worker that counts the messages it sent itself. */
const launchWorker = async (deliveries = { count: 0 }) => {
  const worker = await startWorker({
    connectionString: process.env.DATABASE_URL!,
    transport: smtpTransport(`smtp://127.0.0.1:${catcher.port}`, FROM),
    pollingIntervalSeconds: 0.5,
    log: (message, fields) => {
      if (!message.includes(": sent via")) return;
      deliveries.count++;
      deliveryLines.push({ message, fields });
    },
  });
  workers.push(worker);
  return worker;
};

/** The inbox API, asked from this machine (tests/integration/dev-inbox.test.ts covers everyone else). */
async function fetchCaught(to: string) {
  const response = await emailsLoader({
    request: new Request(`http://localhost/api/dev/emails?to=${encodeURIComponent(to)}`),
    params: {},
    context: loadContextFor("127.0.0.1"),
  } as never);
  return response as Exclude<typeof response, { data: unknown }>;
}

beforeAll(async () => {
  delete process.env.RESEND_API_KEY;
  catcher = await startMailCatcher({ connectionString: process.env.DATABASE_URL!, port: 0, log: () => undefined });
  await launchWorker(firstWorkerDeliveries);
});
afterAll(async () => {
  await Promise.all(workers.map((worker) => worker.stop()));
  await catcher.close();
});

describe("delivery through the local mail catcher", () => {
  it("makes a real SMTP round trip and keeps the message, its parts and headers in the database", async () => {
    const { outboxId } = await sendEmail(db, {
      to: "Invitee@Example.org",
      toName: "Ivy Invitee",
      template: "course-invitation",
      props: {
        courseTitle: "Round-trip course",
        courseCode: "RT 1",
        inviterName: "Ona Owner",
        role: "ta",
        cohortName: null,
        acceptUrl: "http://localhost:3000/invitations/round-trip",
        expiresAt: new Date("2031-01-01T00:00:00Z"),
        timeZone: "UTC",
      },
    });
    const row = await waitFor(async () => {
      const current = await outboxRow(outboxId);
      return current.status === "sent" && current;
    }, "the message to reach the catcher");

    const { emails } = await fetchCaught("invitee@example.org");
    expect(emails).toHaveLength(1);
    const [email] = emails;
    expect(email).toMatchObject({
      to: ["invitee@example.org"],
      subject: "Ona Owner invited you to RT 1 Round-trip course",
      messageId: row.providerMessageId,
    });
    expect(email.from).toContain("no-reply@benchpost.example");
    expect(email.headers["x-benchpost-outbox-id"]).toBe(outboxId);
    expect(email.headers.to).toContain("Ivy Invitee");
    expect(email.html).toContain('href="http://localhost:3000/invitations/round-trip"');
    expect(email.text).toContain("a teaching assistant");
    expect(email.links).toContain("http://localhost:3000/invitations/round-trip");
    expect(row.transport).toBe("smtp");
    // The worker's log line names the queue and the pg-boss job that delivered it.
    const [job] = (await db.execute<{ id: string }>(sql`select id from pgboss.job where data->>'outboxId' = ${outboxId}`)).rows;
    expect(deliveryLines.find((line) => line.message.includes(outboxId))?.fields).toEqual({ queue: "email-delivery", jobId: job.id });
  });

  it("delivers to a name with quotes and angle brackets, which nodemailer encodes", async () => {
    const { outboxId } = await sendEmail(db, { ...signInMessage("ann.lee@example.org"), toName: 'Ann "Nan" <Lee>' });
    await waitFor(async () => (await outboxRow(outboxId)).status === "sent", "the message to reach the catcher");
    const [email] = (await fetchCaught("ann.lee@example.org")).emails;
    expect(email.to).toEqual(["ann.lee@example.org"]);
    expect(addressparser(email.headers.to, { flatten: true })).toEqual([{ name: 'Ann "Nan" <Lee>', address: "ann.lee@example.org" }]);
  });

  it("keeps caught messages when the catcher restarts", async () => {
    await sendEmail(db, signInMessage("restart.catcher@example.org"));
    await waitFor(
      async () =>
        (
          await db
            .select()
            .from(caughtEmails)
            .where(sql`'restart.catcher@example.org' = any(${caughtEmails.toAddresses})`)
        ).length === 1,
      "the message",
    );
    const port = catcher.port;
    await catcher.close();
    catcher = await startMailCatcher({ connectionString: process.env.DATABASE_URL!, port, log: () => undefined });
    expect((await fetchCaught("restart.catcher@example.org")).emails).toHaveLength(1);
  });

  it("delivers each message exactly once with two workers running at once", async () => {
    const secondWorkerDeliveries = { count: 0 };
    await launchWorker(secondWorkerDeliveries);
    const deliveredBefore = firstWorkerDeliveries.count;
    const sent = await db.transaction(async (tx) => {
      const ids: string[] = [];
      for (let index = 0; index < 20; index++) ids.push((await sendEmail(tx, signInMessage(`pair.${index}@example.org`))).outboxId);
      return ids;
    });
    await waitFor(async () => {
      const rows = await db.execute<{ count: number }>(
        sql`select count(*)::int as count from email_outbox where id in ${sent} and status = 'sent'`,
      );
      return rows.rows[0].count === sent.length;
    }, "all 20 messages to be sent");
    const caught = await db.execute<{ outbox_id: string; copies: number }>(
      sql`select headers->>'x-benchpost-outbox-id' as outbox_id, count(*)::int as copies from caught_emails where to_addresses[1] like 'pair.%' group by 1`,
    );
    expect(caught.rows).toHaveLength(20);
    expect(caught.rows.every((row) => row.copies === 1)).toBe(true);
    expect(new Set(caught.rows.map((row) => row.outbox_id))).toEqual(new Set(sent));
    // Both really took part: each polls every 0.5 s, so neither can have taken all 20 alone.
    expect(firstWorkerDeliveries.count - deliveredBefore).toBeGreaterThan(0);
    expect(secondWorkerDeliveries.count).toBeGreaterThan(0);
    expect(firstWorkerDeliveries.count - deliveredBefore + secondWorkerDeliveries.count).toBe(20);
  });

  it("records an attempt before sending, and after a worker dies mid-send sends again with the same Message-ID", async () => {
    // An outbox row with no delivery job, so that only this test delivers it.
    const outboxId = await db.transaction(async (tx) => {
      const { outboxId: id } = await sendEmail(tx, signInMessage("cut.off@example.org"));
      await tx.execute(sql`delete from pgboss.job where data->>'outboxId' = ${id}`);
      return id;
    });
    const smtp = smtpTransport(`smtp://127.0.0.1:${catcher.port}`, FROM);
    // The catcher has the message, then the worker "dies": its answer never comes back.
    const dying: EmailTransport = {
      name: "smtp",
      deliver: async (email) => (await smtp.deliver(email), new Promise<never>(() => undefined)),
    };
    const start = new Date();
    const at = (seconds: number) => new Date(start.getTime() + seconds * 1000);
    void deliverOutboxEmail(db, dying, outboxId, start);
    const copies = () =>
      db
        .select()
        .from(caughtEmails)
        .where(sql`'cut.off@example.org' = any(${caughtEmails.toAddresses})`);
    await waitFor(async () => (await copies()).length === 1, "the first copy");
    // The attempt was committed before the transport was asked.
    expect(await outboxRow(outboxId)).toMatchObject({ status: "queued", attempts: 1, attemptStartedAt: start });

    // Within the attempt's lease nobody else sends it; after it, the retry sends the same message again.
    await expect(deliverOutboxEmail(db, smtp, outboxId, at(ATTEMPT_LEASE_SECONDS - 1))).rejects.toBeInstanceOf(DeliveryInProgressError);
    expect(await deliverOutboxEmail(db, smtp, outboxId, at(ATTEMPT_LEASE_SECONDS + 1))).toBe("resent-after-interrupted-attempt");
    expect(await outboxRow(outboxId)).toMatchObject({ status: "sent", attempts: 2, attemptStartedAt: null });
    const caught = await copies();
    expect(caught).toHaveLength(2);
    expect(new Set(caught.map((email) => email.messageId))).toEqual(new Set([`<${outboxId}@benchpost.example>`]));
    // A later job for the same row sends nothing.
    expect(await deliverOutboxEmail(db, smtp, outboxId, at(3 * ATTEMPT_LEASE_SECONDS))).toBe("already-handled");
    smtp.close?.();
  });

  it("answers 400 to a request without a valid recipient", async () => {
    const response = await emailsLoader({
      request: new Request("http://localhost/api/dev/emails?to=nobody"),
      params: {},
      context: loadContextFor("::1"),
    } as never);
    expect(response).toMatchObject({ init: { status: 400 } });
  });
});
