import { setupServer } from "msw/node";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { courses } from "~/db/schema";
import { db } from "~/server/db.server";
import { resendTransport } from "~/server/email/email-transport.server";
import { listFailedEmails } from "~/server/email/failed-emails.server";
import { sendEmail } from "~/server/email/send-email.server";
import { type Worker, startWorker } from "~/server/jobs/worker.server";
import { mockResend } from "../mocks/resend";
import { outboxRow, signInMessage, useFastRetries, waitFor } from "../support/email";

const resend = mockResend();
const network = setupServer(...resend.handlers);
const FROM = "Benchpost <no-reply@benchpost.example>";
let worker: Worker;

beforeAll(async () => {
  network.listen({ onUnhandledRequest: "error" });
  worker = await startWorker({
    connectionString: process.env.DATABASE_URL!,
    transport: resendTransport("re_test_key", FROM),
    pollingIntervalSeconds: 0.5,
    log: () => undefined,
  });
  // After the worker started: it brings the queue policy in line with the code, and we want it fast.
  await useFastRetries(2);
});
beforeEach(() => resend.reset());
afterAll(async () => {
  await worker.stop();
  network.close();
});

describe("delivery through Resend", () => {
  it("posts the rendered message with the outbox id as idempotency key and keeps Resend's id", async () => {
    const { outboxId } = await sendEmail(db, { ...signInMessage("Student.One@example.org"), toName: "Student One" });
    const row = await waitFor(async () => {
      const current = await outboxRow(outboxId);
      return current.status === "sent" && current;
    }, "the message to be sent");

    expect(resend.requests).toHaveLength(1);
    const [request] = resend.requests;
    expect(request.idempotencyKey).toBe(outboxId);
    expect(request.authorization).toBe("Bearer re_test_key");
    expect(request.body).toMatchObject({
      from: FROM,
      to: ['"Student One" <student.one@example.org>'],
      subject: "Your Benchpost sign-in link",
    });
    expect(request.body.html).toContain('href="http://localhost:3000/sign-in/test-token"');
    expect(request.body.text).toContain("http://localhost:3000/sign-in/test-token");
    expect(request.body.text).toContain("You got this e-mail because");
    expect(row).toMatchObject({ transport: "resend", providerMessageId: resend.accepted.get(outboxId)!.id, attempts: 1, lastError: null });
  });

  it("sends a name with quotes as one quoted mailbox", async () => {
    const { outboxId } = await sendEmail(db, { ...signInMessage("ann.lee@example.org"), toName: 'Ann "Nan" <Lee>' });
    await waitFor(async () => (await outboxRow(outboxId)).status === "sent", "the message to be sent");
    expect(resend.requests[0].body.to).toEqual(['"Ann \\"Nan\\" <Lee>" <ann.lee@example.org>']);
  });

  it("retries after a 429 and a 500 and then sends the message exactly once", async () => {
    resend.failNext(429, 500);
    const { outboxId } = await sendEmail(db, signInMessage("twice.unlucky@example.org"));
    const row = await waitFor(async () => {
      const current = await outboxRow(outboxId);
      return current.status === "sent" && current;
    }, "the third attempt to succeed");

    expect(resend.requests.map((request) => request.idempotencyKey)).toEqual([outboxId, outboxId, outboxId]);
    expect([...resend.accepted.keys()].filter((key) => key === outboxId)).toHaveLength(1);
    expect(row).toMatchObject({ status: "sent", attempts: 3, providerMessageId: resend.accepted.get(outboxId)!.id });
  });

  it("marks the row failed after the last retry and lists it for the course's instructors", async () => {
    const [course] = await db
      .insert(courses)
      .values({ title: "Failing course", code: "F 1", term: "test", timeZone: "UTC" })
      .returning({ id: courses.id });
    resend.failNext(500, 500, 500);
    const { outboxId } = await sendEmail(db, { ...signInMessage("never.arrives@example.org"), courseId: course.id });
    const row = await waitFor(async () => {
      const current = await outboxRow(outboxId);
      return current.status === "failed" && current;
    }, "the row to be marked failed");

    expect(resend.requests).toHaveLength(3);
    expect(resend.accepted.has(outboxId)).toBe(false);
    expect(row.attempts).toBe(3);
    expect(row.lastError).toMatch(/500 internal_server_error/);
    const failed = await listFailedEmails(course.id);
    expect(failed.map((email) => email.id)).toEqual([outboxId]);
    expect(failed[0]).toMatchObject({ toAddress: "never.arrives@example.org", subject: "Your Benchpost sign-in link" });
  });
});
