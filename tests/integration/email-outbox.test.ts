import { count, eq, sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { emailOutbox } from "~/db/schema";
import { db } from "~/server/db.server";
import { EmailRejectedError, sendEmail } from "~/server/email/send-email.server";
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
    expect(row).toMatchObject({ toAddress: "new.student@example.org", toName: "New Student", status: "queued", template: "course-invitation" });
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
    expect(second).toEqual({ outboxId: first.outboxId, duplicate: true });
    expect(await db.select().from(emailOutbox).where(eq(emailOutbox.dedupeKey, "test:once"))).toHaveLength(1);
    expect(await deliveryJobs(first.outboxId)).toHaveLength(1);
  });

  it("rejects an invalid recipient before anything is queued", async () => {
    const before = await outboxCount();
    const attempt = sendEmail(db, signInMessage("not an address"));
    await expect(attempt).rejects.toBeInstanceOf(EmailRejectedError);
    await expect(sendEmail(db, signInMessage("not an address"))).rejects.toThrow(/to: not a valid e-mail address/);
    expect(await outboxCount()).toBe(before);
  });

  it("refuses a subject that would inject headers with CR or LF", async () => {
    await expect(sendEmail(db, invitation({ courseTitle: "Fluids\r\nBcc: everyone@example.org" }))).rejects.toThrow(/CR or LF/);
    await expect(sendEmail(db, { ...signInMessage("a@example.org"), toName: "Eve\nBcc: x@example.org" })).rejects.toThrow(/toName/);
  });

  it("refuses an oversized subject", async () => {
    await expect(sendEmail(db, invitation({ inviterName: "A".repeat(150), courseTitle: "B".repeat(150) }))).rejects.toThrow(/subject: subject is longer than 180/);
  });

  it("refuses props that do not match the template", async () => {
    await expect(sendEmail(db, { ...signInMessage("a@example.org"), props: { url: "javascript:alert(1)", expiresInMinutes: 15 } })).rejects.toThrow(/props\.url/);
  });
});
