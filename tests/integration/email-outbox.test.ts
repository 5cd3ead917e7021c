import { count, eq, sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { emailOutbox } from "~/db/schema";
import { db } from "~/server/db.server";
import { SUBJECT_MAX_LENGTH, sendEmail, sendEmails } from "~/server/email/send-email.server";
import { deliveryJobs, outboxRow, signInMessage } from "../support/email";

const invitation = (overrides: Partial<{ courseTitle: string; inviterName: string }> = {}) =>
  ({
    to: "new.student@example.org",
    template: "course-invitation",
    props: {
      courseTitle: "Test course",
      courseCode: "T 1",
      inviterName: "Test Inviter",
      role: "student",
      cohortName: null,
      acceptUrl: "http://localhost:3000/invitations/abc",
      expiresAt: new Date("2031-02-03T04:05:06Z"),
      timeZone: "Europe/Lisbon",
      ...overrides,
    },
  }) as const;

async function outboxCount(): Promise<number> {
  const [row] = await db.select({ value: count() }).from(emailOutbox);
  return row.value;
}

describe("sendEmail", () => {
  it("writes the outbox row and its delivery job in the caller's transaction", async () => {
    const { outboxId, duplicate } = await db.transaction((tx) => sendEmail(tx, { ...invitation(), toName: "New Student" }));
    expect(duplicate).toBe(false);
    const row = await outboxRow(outboxId);
    expect(row).toMatchObject({
      toAddress: "new.student@example.org",
      toName: "New Student",
      status: "queued",
      template: "course-invitation",
    });
    expect(row.subject).toBe("Test Inviter invited you to T 1 Test course");
    expect(row.props.expiresAt).toBe("2031-02-03T04:05:06.000Z");
    expect(await deliveryJobs(outboxId)).toEqual([{ state: "created", retry_count: 0 }]);
  });

  it("lower-cases the address and works on the database handle outside a transaction", async () => {
    const { outboxId } = await sendEmail(db, signInMessage("Mixed.Case@Example.org"));
    expect((await outboxRow(outboxId)).toAddress).toBe("mixed.case@example.org");
    expect(await deliveryJobs(outboxId)).toHaveLength(1);
  });

  it("leaves no outbox row and no job when the business transaction rolls back", async () => {
    const before = await outboxCount();
    let queued: string | undefined;
    await expect(
      db.transaction(async (tx) => {
        queued = (await sendEmail(tx, signInMessage("rolled.back@example.org"))).outboxId;
        await tx.execute(sql`select 1`);
        throw new Error("business rule failed after the e-mail was queued");
      }),
    ).rejects.toThrow("business rule failed");
    expect(queued).toBeDefined();
    expect(await outboxCount()).toBe(before);
    expect(await deliveryJobs(queued!)).toEqual([]);
  });

  it("treats a repeated dedupe key as a no-op that returns the first row", async () => {
    const first = await sendEmail(db, { ...signInMessage("once@example.org"), dedupeKey: "test:once" });
    const second = await sendEmail(db, { ...signInMessage("once@example.org"), dedupeKey: "test:once" });
    expect(second).toEqual({ outboxId: first.outboxId, duplicate: true, refused: false });
    expect(await db.select().from(emailOutbox).where(eq(emailOutbox.dedupeKey, "test:once"))).toHaveLength(1);
    expect(await deliveryJobs(first.outboxId)).toHaveLength(1);
  });

  it("writes an invalid recipient as a failed row with the reason, and queues no job for it", async () => {
    const result = await sendEmail(db, signInMessage("not an address"));
    expect(result).toMatchObject({ duplicate: false, refused: true });
    expect(await outboxRow(result.outboxId)).toMatchObject({
      status: "failed",
      toAddress: "not an address",
      lastError: expect.stringMatching(/to: not a valid e-mail address/),
    });
    expect((await outboxRow(result.outboxId)).failedAt).not.toBeNull();
    expect(await deliveryJobs(result.outboxId)).toEqual([]);
  });

  it("sends the rest of a batch when one message in it cannot be sent", async () => {
    const results = await db.transaction((tx) =>
      sendEmails(tx, [
        signInMessage("first@example.org"),
        signInMessage("second@@example.org"),
        { ...signInMessage("third@example.org"), toName: 'Ann "Nan" <Lee>' },
      ]),
    );
    expect(results.map((result) => result.refused)).toEqual([false, true, false]);
    expect((await outboxRow(results[1].outboxId)).status).toBe("failed");
    for (const index of [0, 2]) {
      expect((await outboxRow(results[index].outboxId)).status).toBe("queued");
      expect(await deliveryJobs(results[index].outboxId)).toHaveLength(1);
    }
    // The name is kept as typed: the transport encodes it.
    expect((await outboxRow(results[2].outboxId)).toName).toBe('Ann "Nan" <Lee>');
  });

  it("keeps CR and LF out of headers: a name becomes one line, props with a line break are refused", async () => {
    const refused = await sendEmail(db, invitation({ courseTitle: "Fluids\r\nBcc: everyone@example.org" }));
    expect(await outboxRow(refused.outboxId)).toMatchObject({
      status: "failed",
      lastError: expect.stringMatching(/props\.courseTitle: .*CR or LF/),
    });
    const { outboxId } = await sendEmail(db, { ...signInMessage("a@example.org"), toName: "Eve\nBcc: x@example.org" });
    expect(await outboxRow(outboxId)).toMatchObject({ status: "queued", toName: "Eve Bcc: x@example.org" });
  });

  it(`shortens a subject over ${SUBJECT_MAX_LENGTH} characters with an ellipsis`, async () => {
    const { outboxId, refused } = await sendEmail(db, invitation({ inviterName: "A".repeat(150), courseTitle: "B".repeat(110) }));
    expect(refused).toBe(false);
    const { subject, status } = await outboxRow(outboxId);
    expect(status).toBe("queued");
    expect(subject).toHaveLength(SUBJECT_MAX_LENGTH);
    expect(subject).toMatch(new RegExp(`^A{150} invited you to T 1 B+…$`));
  });

  it("refuses props that do not match the template, as a failed row", async () => {
    const { outboxId } = await sendEmail(db, {
      ...signInMessage("a@example.org"),
      props: { url: "javascript:alert(1)", expiresInMinutes: 15 },
    });
    expect(await outboxRow(outboxId)).toMatchObject({ status: "failed", lastError: expect.stringMatching(/props\.url/) });
  });
});
