/**
 * Messages to a cohort: the audience's filters pick the right students, a TA reaches only their cohorts,
 * sending writes one outbox row and one recipient row per student in a constant number of statements,
 * once per send key, and is refused when the audience changed since the preview.
 */
import { and, eq, like, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import {
  auditEvents,
  cohorts,
  courseMemberships,
  courseMessageRecipients,
  courseMessages,
  emailOutbox,
  labCohorts,
  labs,
} from "~/db/schema";
import { AppError } from "~/lib/app-error";
import type { Audience } from "~/lib/messages/message-input";
import type { CourseAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { listCourseMessages, previewCourseMessage, sendCourseMessage } from "~/server/messages/course-messages.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { seedClass } from "../support/comparison-class";
import { countAllStatements } from "../support/count-statements";

let fixture: AccessFixture;
let handle: AppHandler;
const text = { subject: "Lab 1 is due on Friday", body: "Hello all,\n\nThe drag lab is due on Friday.\nBring your kit." };

const accessOf = (actor: "instructor" | "assignedTa", cohortIds: string[]): CourseAccess =>
  ({
    user: {
      id: fixture.userIds[actor],
      email: `${actor.toLowerCase()}@msg.example`,
      name: `Test ${actor}`,
      sessionId: null,
      via: "session",
    },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "msg-A", term: "Test term", timeZone: "UTC", archivedAt: null },
    membership: { id: fixture.membershipIds[actor], role: actor === "instructor" ? "instructor" : "ta", cohortId: null },
    cohortIds,
  }) as CourseAccess;

const instructor = () => accessOf("instructor", [fixture.cohortId, fixture.otherCohortId]);
const names = async (audience: Audience) => {
  const preview = await previewCourseMessage(db, instructor(), { audience, ...text });
  return { count: preview.count, names: preview.names, label: preview.audienceLabel };
};

beforeAll(async () => {
  fixture = await createAccessFixture("msg");
  handle = await createAppHandler();
});

describe("the audience", () => {
  it("is the active students of the chosen cohorts", async () => {
    expect(await names({ cohortIds: [fixture.cohortId] })).toEqual({
      count: 2,
      names: ["Test ownStudent", "Test sameCohortStudent"],
      label: "Students of Cohort one",
    });
    expect((await names({ cohortIds: [fixture.cohortId, fixture.otherCohortId] })).count).toBe(3);
  });

  it("narrowed by a lab and a hand-in state picks the students the lab is set for whose hand-in stands so", async () => {
    // The fixture's lab is set for cohort one; ownStudent has handed it in (on time, not marked), sameCohortStudent has not.
    const both = [fixture.cohortId, fixture.otherCohortId];
    expect(await names({ cohortIds: both, labId: fixture.labId, handInState: "not-handed-in" })).toEqual({
      count: 1,
      names: ["Test sameCohortStudent"],
      label: "Students of Cohort one and Cohort two who have not handed in “Drag on a steel sphere”",
    });
    expect((await names({ cohortIds: both, labId: fixture.labId, handInState: "handed-in" })).names).toEqual(["Test ownStudent"]);
    expect((await names({ cohortIds: both, labId: fixture.labId, handInState: "not-marked" })).names).toEqual(["Test ownStudent"]);
    expect((await names({ cohortIds: both, labId: fixture.labId, handInState: "handed-in-late" })).count).toBe(0);
    expect((await names({ cohortIds: both, labId: fixture.labId })).count).toBe(2);
  });

  it("is refused to a TA for a cohort they are not assigned to, in the function and through the page", async () => {
    const ta = accessOf("assignedTa", [fixture.cohortId]);
    await expect(previewCourseMessage(db, ta, { audience: { cohortIds: [fixture.otherCohortId] }, ...text })).rejects.toMatchObject({
      status: 403,
      code: "cohort_not_assigned",
    });
    const cookie = await sessionCookieFor(fixture.userIds.assignedTa);
    const response = await handle(
      appRequest(`/courses/${fixture.courseId}/messages/new`, {
        cookie,
        form: { intent: "preview", cohortIds: fixture.otherCohortId, subject: text.subject, body: text.body },
      }),
    );
    expect(response.status).toBe(403);
    // The TA's own cohort previews.
    const own = await handle(
      appRequest(`/courses/${fixture.courseId}/messages/new`, {
        cookie,
        form: { intent: "preview", cohortIds: fixture.cohortId, subject: text.subject, body: text.body },
      }),
    );
    expect(own.status).toBe(200);
    expect(await own.text()).toContain("Send to 2 students");
  });
});

describe("sending", () => {
  it("writes one outbox row and one recipient row per student, audits it, and sends once per send key", async () => {
    const audience = { cohortIds: [fixture.cohortId] };
    const preview = await previewCourseMessage(db, instructor(), { audience, ...text });
    const sent = await sendCourseMessage(db, instructor(), { audience, ...text, sendKey: preview.sendKey, expectedCount: preview.count });
    expect(sent).toMatchObject({ recipientCount: 2, duplicate: false });

    const recipients = await db
      .select({ membershipId: courseMessageRecipients.membershipId, outbox: emailOutbox })
      .from(courseMessageRecipients)
      .innerJoin(emailOutbox, eq(emailOutbox.id, courseMessageRecipients.outboxId))
      .where(eq(courseMessageRecipients.messageId, sent.messageId));
    expect(recipients.map((row) => row.membershipId).sort()).toEqual(
      [fixture.membershipIds.ownStudent, fixture.membershipIds.sameCohortStudent].sort(),
    );
    for (const { membershipId, outbox } of recipients) {
      expect(outbox.dedupeKey).toBe(`course-message:${sent.messageId}:${membershipId}`);
      expect(outbox).toMatchObject({ template: "course-message", status: "queued", courseId: fixture.courseId });
      expect(outbox.subject).toBe("Settling Spheres: Lab 1 is due on Friday");
      expect(outbox.props).toMatchObject({ authorName: "Test instructor", body: text.body });
    }
    const [message] = await db.select().from(courseMessages).where(eq(courseMessages.id, sent.messageId));
    expect(message).toMatchObject({
      audienceLabel: "Students of Cohort one",
      recipientCount: 2,
      audience: { cohortIds: [fixture.cohortId] },
    });
    const audits = await db
      .select()
      .from(auditEvents)
      .where(eq(auditEvents.subject, `course_message:${sent.messageId}`));
    expect(audits.map((event) => event.action)).toEqual(["course.message_sent"]);

    // The same form again (a second click, a resent page): the first message, nothing new.
    const again = await sendCourseMessage(db, instructor(), { audience, ...text, sendKey: preview.sendKey, expectedCount: preview.count });
    expect(again).toEqual({ messageId: sent.messageId, recipientCount: 2, duplicate: true });
    const [{ outboxRows }] = await db
      .select({ outboxRows: sql<number>`count(*)::int` })
      .from(emailOutbox)
      .where(like(emailOutbox.dedupeKey, `course-message:${sent.messageId}:%`));
    expect(outboxRows).toBe(2);
  });

  it("refuses with the new count when the audience changed since the preview, and sends nothing", async () => {
    const audience = { cohortIds: [fixture.otherCohortId] };
    const preview = await previewCourseMessage(db, instructor(), { audience, ...text });
    expect(preview.count).toBe(1);
    // sameCohortStudent moves to cohort two after the preview.
    await db
      .update(courseMemberships)
      .set({ cohortId: fixture.otherCohortId })
      .where(eq(courseMemberships.id, fixture.membershipIds.sameCohortStudent));
    try {
      const refusal = await sendCourseMessage(db, instructor(), { audience, ...text, sendKey: preview.sendKey, expectedCount: 1 }).catch(
        (error) => error,
      );
      expect(refusal).toBeInstanceOf(AppError);
      expect(refusal).toMatchObject({ status: 409, code: "audience_changed" });
      expect(refusal.message).toContain("it is now 2 students, not 1");
      const written = await db.select().from(courseMessages).where(eq(courseMessages.sendKey, preview.sendKey));
      expect(written).toEqual([]);
    } finally {
      await db
        .update(courseMemberships)
        .set({ cohortId: fixture.cohortId })
        .where(eq(courseMemberships.id, fixture.membershipIds.sameCohortStudent));
    }
  });

  it("runs the same number of statements for 10 and 1,000 students", async () => {
    async function classOf(size: number) {
      const [cohort] = await db
        .insert(cohorts)
        .values({ courseId: fixture.courseId, name: `Class of ${size}` })
        .returning();
      const [lab] = await db
        .insert(labs)
        .values({
          courseId: fixture.courseId,
          title: `Lab for ${size}`,
          kind: "drag",
          status: "published",
          opensAt: new Date(),
          dueAt: new Date(Date.now() + 86_400_000),
          resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
        })
        .returning();
      await db.insert(labCohorts).values({ labId: lab.id, cohortId: cohort.id });
      await seedClass(db, {
        courseId: fixture.courseId,
        labId: lab.id,
        cohortId: cohort.id,
        members: Array.from({ length: size }, () => ({ figure: 1 })),
        label: `msg${size}`,
      });
      return { cohortId: cohort.id, labId: lab.id };
    }
    const counts: number[] = [];
    for (const size of [10, 1000]) {
      const { cohortId, labId } = await classOf(size);
      const audience: Audience = { cohortIds: [cohortId], labId, handInState: "not-marked" };
      const access = accessOf("instructor", [...instructor().cohortIds, cohortId]);
      const preview = await previewCourseMessage(db, access, { audience, ...text });
      expect(preview.count).toBe(size);
      const { statements, result } = await countAllStatements(() =>
        sendCourseMessage(db, access, { audience, ...text, sendKey: preview.sendKey, expectedCount: size }),
      );
      expect(result.recipientCount).toBe(size);
      const [{ rows }] = await db
        .select({ rows: sql<number>`count(*)::int` })
        .from(courseMessageRecipients)
        .where(and(eq(courseMessageRecipients.messageId, result.messageId), sql`${courseMessageRecipients.outboxId} is not null`));
      expect(rows).toBe(size);
      counts.push(statements);
    }
    expect(counts[1]).toBe(counts[0]);
  });
});

describe("the pages", () => {
  it("previews, sends and lists a message through the app, keeping what was typed when it is refused", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const path = `/courses/${fixture.courseId}/messages/new`;
    const form = {
      cohortIds: fixture.otherCohortId,
      labId: "",
      handInState: "",
      subject: "Kits go back on Monday",
      body: "Pack your kit.",
    };
    const refused = await handle(appRequest(path, { cookie, form: { ...form, intent: "preview", labId: "", handInState: "handed-in" } }));
    expect(refused.status).toBe(400);
    const refusedPage = await refused.text();
    expect(refusedPage).toContain("A hand-in state needs a lab");
    expect(refusedPage).toContain("Kits go back on Monday");

    const preview = await handle(appRequest(path, { cookie, form: { ...form, intent: "preview" } }));
    expect(preview.status).toBe(200);
    const page = await preview.text();
    expect(page).toContain("Students of Cohort two");
    const sendKey = page.match(/name="sendKey" value="([a-z2-7]+)"/)?.[1];
    expect(sendKey).toBeDefined();
    const send = () => handle(appRequest(path, { cookie, form: { ...form, intent: "send", sendKey: sendKey!, expectedCount: "1" } }));
    const sent = await send();
    expect(sent.status).toBe(302);
    expect(sent.headers.get("location")).toBe(`/courses/${fixture.courseId}/messages?sent=1`);
    expect((await send()).status).toBe(302);
    expect((await db.select().from(courseMessages).where(eq(courseMessages.sendKey, sendKey!))).length).toBe(1);

    const list = await (await handle(appRequest(`/courses/${fixture.courseId}/messages?sent=1`, { cookie }))).text();
    expect(list).toContain("Kits go back on Monday");
    expect(list).toContain("Your message is on its way to 1 student.");
    // The TA of cohort one sees only the messages that went to their cohort alone.
    const ta = await listCourseMessages(db, accessOf("assignedTa", [fixture.cohortId]));
    expect(ta.map((message) => message.subject)).not.toContain("Kits go back on Monday");
    expect(ta.map((message) => message.subject)).toContain(text.subject);
  });
});
