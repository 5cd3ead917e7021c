/**
 * Kits coming back: the course's return settings, a student's return parcel, the overdue list at a
 * fixed clock, the reminders (once per kit and day), and the bulk check-in that records every part.
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, courseMemberships, courses, emailOutbox, kitEvents, kitParts, kits, partEvents, parts, users } from "~/db/schema";
import { db } from "~/server/db.server";
import { smtpTransport } from "~/server/email/email-transport.server";
import { kitReturnRemindersCron, queues } from "~/server/jobs/boss.server";
import { startWorker } from "~/server/jobs/worker.server";
import { checkInKits, createKit, moveKits } from "~/server/kits/kits.server";
import { listOverdueKits, sendKitBack, sendOverdueReminders } from "~/server/kits/returns.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { type AppHandler, appRequest, createAppHandler, sessionCookieFor } from "../support/app-requests";
import { countStatements } from "../support/count-statements";
import { dublin } from "../support/dublin-time";

let handle: AppHandler;

beforeAll(async () => {
  handle = await createAppHandler();
});

async function kitRow(kitId: string) {
  const [kit] = await db.select().from(kits).where(eq(kits.id, kitId));
  return kit;
}

const address = {
  "returnAddress.name": "Fluids Lab",
  "returnAddress.line1": "1 Quay Street",
  "returnAddress.city": "Galway",
  "returnAddress.postcode": "H91 TK33",
  "returnAddress.country": "ie",
};

describe("the reminder job", () => {
  it("is put on pg-boss's cron by the worker, every hour", async () => {
    // No mail is sent here: the transport only has to exist.
    const worker = await startWorker({
      connectionString: process.env.DATABASE_URL!,
      transport: smtpTransport("smtp://127.0.0.1:9", "Benchpost <no-reply@benchpost.example>"),
      log: () => undefined,
    });
    try {
      const schedule = await db.execute<{ cron: string; timezone: string }>(
        sql`select cron, timezone from pgboss.schedule where name = ${queues.kitReturnReminders}`,
      );
      expect(schedule.rows).toEqual([{ cron: kitReturnRemindersCron, timezone: "UTC" }]);
    } finally {
      await worker.stop();
    }
  });
});

describe("the course's return settings", () => {
  let fixture: AccessFixture;
  let post: (form: Record<string, string>) => Promise<Response>;

  beforeAll(async () => {
    fixture = await createAccessFixture("return-settings");
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    post = (form) => handle(appRequest(`/courses/${fixture.courseId}/settings`, { cookie, form: { intent: "returns", ...form } }));
  });

  const course = async () => (await db.select().from(courses).where(eq(courses.id, fixture.courseId)))[0];

  it("refuses a date that is not one and keeps what was typed", async () => {
    const response = await post({ kitReturnBy: "2027-02-30", kitReturnReminderDays: "1, 7", ...address });
    expect(response.status).toBe(400);
    const page = await response.text();
    expect(page).toContain("Enter the return-by date as a date");
    expect(page).toContain("H91 TK33");
    expect((await course()).kitReturnBy).toBeNull();
  });

  it("refuses a bad address field at that field, keeping the rest of what was typed", async () => {
    const response = await post({
      kitReturnBy: "2027-05-28",
      kitReturnReminderDays: "1, 7",
      ...address,
      "returnAddress.country": "Ireland",
    });
    expect(response.status).toBe(400);
    const page = await response.text();
    expect(page).toContain("two-letter code");
    expect(page).toContain('value="Ireland"');
    expect(page).toContain('value="1 Quay Street"');
    expect((await course()).returnAddress).toBeNull();
  });

  it("refuses reminder days that are not whole days after the date", async () => {
    const response = await post({ kitReturnBy: "2027-05-28", kitReturnReminderDays: "1, -3", ...address });
    expect(response.status).toBe(400);
    expect(await response.text()).toContain("whole numbers separated by commas");
  });

  it("saves the date, the reminder days in order and the address, and audits the change", async () => {
    const response = await post({ kitReturnBy: "2027-05-28", kitReturnReminderDays: "7; 1 7", ...address });
    expect(response.status).toBe(200);
    expect(await course()).toMatchObject({
      kitReturnBy: "2027-05-28",
      kitReturnReminderDays: [1, 7],
      returnAddress: { name: "Fluids Lab", line1: "1 Quay Street", city: "Galway", postcode: "H91 TK33", country: "IE", line2: null },
    });
    const audit = await db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.courseId, fixture.courseId), eq(auditEvents.action, "course.settings_changed")));
    expect(audit.map((event) => event.detail.kitReturnBy)).toEqual(["2027-05-28"]);

    // Every address field blank: the course has no return address again; no date, no reminders.
    const cleared = await post({ kitReturnBy: "", kitReturnReminderDays: "" });
    expect(cleared.status).toBe(200);
    expect(await course()).toMatchObject({ kitReturnBy: null, kitReturnReminderDays: [], returnAddress: null });
  });
});

describe("a student sending their kit back", () => {
  let fixture: AccessFixture;
  const parcel = { intent: "send-back", carrier: "An Post", trackingNumber: "CD123456789IE", shippedOn: "2027-05-27" };

  beforeAll(async () => {
    fixture = await createAccessFixture("send-back");
    await db
      .update(courses)
      .set({ kitReturnBy: "2027-05-28", returnAddress: { name: "Fluids Lab", line1: "1 Quay Street", city: "Galway", country: "IE" } })
      .where(eq(courses.id, fixture.courseId));
  });

  it("shows the return-by date and the return address on My kit", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.ownStudent);
    const page = await (await handle(appRequest(`/courses/${fixture.courseId}/my-kit`, { cookie }))).text();
    expect(page).toContain("Fri, 28 May 2027");
    expect(page).toContain("1 Quay Street");
  });

  it("is refused for a student without a kit, and the holder's kit is left alone", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.sameCohortStudent);
    const response = await handle(appRequest(`/courses/${fixture.courseId}/my-kit`, { cookie, form: parcel }));
    expect(response.status).toBe(404);
    expect((await kitRow(fixture.kitId)).state).toBe("at_home");
  });

  it("moves the student's own kit to coming back with its return parcel, once", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.ownStudent);
    const bad = await handle(appRequest(`/courses/${fixture.courseId}/my-kit`, { cookie, form: { ...parcel, trackingNumber: "" } }));
    expect(bad.status).toBe(400);
    expect((await kitRow(fixture.kitId)).state).toBe("at_home");

    const response = await handle(appRequest(`/courses/${fixture.courseId}/my-kit`, { cookie, form: parcel }));
    expect(response.status).toBe(200);
    expect(await kitRow(fixture.kitId)).toMatchObject({
      state: "coming_back",
      holderMembershipId: fixture.membershipIds.ownStudent,
      returnCarrier: "An Post",
      returnTrackingNumber: "CD123456789IE",
      returnShippedOn: "2027-05-27",
      // The outbound parcel is kept beside it.
      trackingNumber: null,
    });
    // Sent again (a second click): the kit is no longer at home.
    const again = await handle(appRequest(`/courses/${fixture.courseId}/my-kit`, { cookie, form: { ...parcel, trackingNumber: "XX999" } }));
    expect(again.status).toBe(400);
    expect(await again.text()).toContain("Only a kit at your home can be sent back");
    expect((await kitRow(fixture.kitId)).returnTrackingNumber).toBe("CD123456789IE");
  });

  it("is refused for a kit that has not reached the student", async () => {
    const kit = await createKit(db, { courseId: fixture.courseId, actorId: fixture.userIds.instructor, number: "SB-2", partIds: [] });
    const base = { courseId: fixture.courseId, actorId: fixture.userIds.instructor, kitIds: [kit.id] };
    await moveKits(db, { ...base, move: { to: "packed", holderMembershipId: fixture.membershipIds.otherCohortStudent } });
    await moveKits(db, {
      ...base,
      move: { to: "in_transit", shipping: { carrier: "An Post", trackingNumber: "OUT1", shippedOn: "2027-05-01" } },
    });
    await expect(
      sendKitBack(db, {
        courseId: fixture.courseId,
        actorId: fixture.userIds.otherCohortStudent,
        kitId: kit.id,
        shipping: { carrier: "An Post", trackingNumber: "BACK1", shippedOn: "2027-05-02" },
      }),
    ).rejects.toMatchObject({ code: "kit_refused" });
    expect((await kitRow(kit.id)).state).toBe("in_transit");
  });
});

/**
 * One course in Dublin, kits due back by Friday, 28 May 2027: K-01 still at ownStudent's home, one coming
 * back from sameCohortStudent, one still on its way out to otherCohortStudent (cohort two), one on the shelf.
 */
async function overdueCourse(label: string) {
  const fixture = await createAccessFixture(label);
  await db
    .update(courses)
    .set({ timeZone: "Europe/Dublin", kitReturnBy: "2027-05-28", kitReturnReminderDays: [1, 7] })
    .where(eq(courses.id, fixture.courseId));
  const [comingBack, inTransit] = await db
    .insert(kits)
    .values([
      {
        courseId: fixture.courseId,
        number: "K-02",
        state: "coming_back",
        holderMembershipId: fixture.membershipIds.sameCohortStudent,
        returnCarrier: "An Post",
        returnTrackingNumber: "BACK2",
        returnShippedOn: "2027-05-30",
      },
      {
        courseId: fixture.courseId,
        number: "K-03",
        state: "in_transit",
        holderMembershipId: fixture.membershipIds.otherCohortStudent,
        carrier: "An Post",
        trackingNumber: "OUT3",
        shippedOn: "2027-05-20",
      },
      { courseId: fixture.courseId, number: "K-04", state: "on_shelf" },
    ])
    .returning();
  return { fixture, comingBackId: comingBack.id, inTransitId: inTransit.id };
}

describe("the overdue list", () => {
  it("lists nothing on the return-by day itself, then the kits out with students, the one at home counted as overdue", async () => {
    const { fixture, comingBackId, inTransitId } = await overdueCourse("overdue-list");
    const page = { page: 1, pageSize: 25 };
    // 23:30 in Dublin on the 28th is 22:30 UTC: still the return-by day there.
    expect((await listOverdueKits(db, fixture.courseId, { ...page, now: dublin("2027-05-28T23:30") })).total).toBe(0);

    const { statements, result } = await countStatements(() =>
      listOverdueKits(db, fixture.courseId, { ...page, now: dublin("2027-06-04T10:00") }),
    );
    expect(statements).toBe(2);
    expect(result.total).toBe(3);
    expect(result.rows.map((row) => [row.number, row.state, row.overdue, row.daysOverdue, row.studentName, row.cohortName])).toEqual([
      ["K-01", "at_home", true, 7, "Test ownStudent", "Cohort one"],
      ["K-02", "coming_back", false, 7, "Test sameCohortStudent", "Cohort one"],
      ["K-03", "in_transit", false, 7, "Test otherCohortStudent", "Cohort two"],
    ]);
    expect(result.rows.find((row) => row.id === comingBackId)).toMatchObject({ returnTrackingNumber: "BACK2", lastReminderAt: null });
    expect(result.rows.find((row) => row.id === inTransitId)).toMatchObject({ trackingNumber: "OUT3" });

    // A TA of cohort two sees its kit only.
    const ofCohortTwo = await listOverdueKits(db, fixture.courseId, {
      ...page,
      cohortIds: [fixture.otherCohortId],
      now: dublin("2027-06-04T10:00"),
    });
    expect(ofCohortTwo.rows.map((row) => row.number)).toEqual(["K-03"]);
  });

  it("is shown to the course's staff, a TA's view kept to their cohorts", async () => {
    const { fixture } = await overdueCourse("overdue-page");
    // The page reads the real clock: a return-by date safely in the past.
    await db.update(courses).set({ kitReturnBy: "2020-01-31" }).where(eq(courses.id, fixture.courseId));
    const pageFor = async (userId: string) =>
      (await handle(appRequest(`/courses/${fixture.courseId}/kits/overdue`, { cookie: await sessionCookieFor(userId) }))).text();
    const instructorPage = await pageFor(fixture.userIds.instructor);
    expect(instructorPage).toContain("Fri, 31 Jan 2020");
    expect(instructorPage).toContain("K-03");
    expect(instructorPage).toContain("BACK2");
    const taPage = await pageFor(fixture.userIds.assignedTa);
    expect(taPage).toContain("K-01");
    expect(taPage).not.toContain("K-03");
  });
});

describe("overdue reminders", () => {
  it("e-mail a student once per kit and reminder day, from 09:00 in the course's zone, and never for a kit coming back", async () => {
    const { fixture } = await overdueCourse("reminders");
    const sent = async () =>
      db
        .select({ to: emailOutbox.toAddress, dedupeKey: emailOutbox.dedupeKey, props: emailOutbox.props })
        .from(emailOutbox)
        .where(and(eq(emailOutbox.courseId, fixture.courseId), eq(emailOutbox.template, "kit-overdue")))
        .orderBy(emailOutbox.createdAt);
    const keyOf = (day: number) => `kit-overdue:${fixture.kitId}:${fixture.membershipIds.ownStudent}:2027-05-28:${day}`;

    await sendOverdueReminders(db, dublin("2027-05-28T20:00"));
    // Day 1, before nine in Dublin: nothing yet.
    await sendOverdueReminders(db, dublin("2027-05-29T08:30"));
    expect(await sent()).toEqual([]);

    const { statements } = await countStatements(() => sendOverdueReminders(db, dublin("2027-05-29T09:41")));
    await sendOverdueReminders(db, dublin("2027-05-29T10:41"));
    await sendOverdueReminders(db, dublin("2027-06-02T09:41"));
    expect((await sent()).map((mail) => [mail.to, mail.dedupeKey])).toEqual([["ownstudent@reminders.example", keyOf(1)]]);
    expect((await sent())[0].props).toMatchObject({ kitNumber: "K-01", returnBy: "Fri, 28 May 2027", daysOverdue: 1 });

    // Day 7 (4 June), and again an hour later: the second reminder, once.
    await sendOverdueReminders(db, dublin("2027-06-04T09:41"));
    await sendOverdueReminders(db, dublin("2027-06-04T10:41"));
    expect((await sent()).map((mail) => mail.dedupeKey)).toEqual([keyOf(1), keyOf(7)]);

    // The overdue list says when the student was last reminded.
    const list = await listOverdueKits(db, fixture.courseId, { page: 1, pageSize: 25, now: dublin("2027-06-04T12:00") });
    expect(list.rows.find((row) => row.number === "K-01")?.lastReminderAt).not.toBeNull();

    // The same statements for thirty more overdue kits, each with its own student.
    const many = await overdueCourse("reminders-many");
    const students = await db
      .insert(users)
      .values(Array.from({ length: 30 }, (_, index) => ({ email: `student-${index}@reminders-many.example`, name: `Student ${index}` })))
      .returning({ id: users.id });
    const memberships = await db
      .insert(courseMemberships)
      .values(
        students.map((student) => ({
          courseId: many.fixture.courseId,
          userId: student.id,
          role: "student" as const,
          cohortId: many.fixture.cohortId,
        })),
      )
      .returning({ id: courseMemberships.id });
    await db.insert(kits).values(
      memberships.map((membership, index) => ({
        courseId: many.fixture.courseId,
        number: `M-${index}`,
        state: "at_home" as const,
        holderMembershipId: membership.id,
      })),
    );
    const later = await countStatements(() => sendOverdueReminders(db, dublin("2027-05-29T11:41")));
    expect(later.statements).toBe(statements);
    expect(later.result.sent).toBe(31);
  });
});

describe("checking kits in together", () => {
  let fixture: AccessFixture;
  let secondKitId: string;
  let partIdOf: (label: string) => string;
  let post: (form: Record<string, string>) => Promise<Response>;

  beforeAll(async () => {
    fixture = await createAccessFixture("bulk-check-in");
    const [sphere, column] = await db
      .insert(parts)
      .values([
        { courseId: fixture.courseId, kind: "sphere", label: "S-2", material: "glass", diameterMm: 3, massG: 0.04 },
        { courseId: fixture.courseId, kind: "column", label: "C-2", innerDiameterMm: 40, timedDistanceMm: 200, runInMm: 100 },
      ])
      .returning();
    const [second] = await db
      .insert(kits)
      .values({
        courseId: fixture.courseId,
        number: "K-02",
        state: "coming_back",
        holderMembershipId: fixture.membershipIds.sameCohortStudent,
      })
      .returning();
    secondKitId = second.id;
    await db.insert(kitParts).values([
      { kitId: second.id, partId: sphere.id },
      { kitId: second.id, partId: column.id },
    ]);
    await moveKits(db, {
      courseId: fixture.courseId,
      actorId: fixture.userIds.instructor,
      kitIds: [fixture.kitId],
      move: { to: "coming_back" },
    });
    const all = await db.select({ id: parts.id, label: parts.label }).from(parts).where(eq(parts.courseId, fixture.courseId));
    partIdOf = (label) => all.find((part) => part.label === label)!.id;
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    // Posted where the page is, with the chosen kits in its address (as the page's form does).
    const chosen = [fixture.kitId, secondKitId].map((id) => `kit=${id}`).join("&");
    post = (form) => handle(appRequest(`/courses/${fixture.courseId}/kits/check-in?${chosen}`, { cookie, form }));
  });

  /** K-01 (S-1, C-1, F-1) and K-02 (S-2, C-2), each part's fields as the page names them. */
  const form = (first: Record<string, string>, second: Record<string, string>) => ({
    "kits[0].kitId": fixture.kitId,
    "kits[0].parts[0].partId": partIdOf("S-1"),
    "kits[0].parts[1].partId": partIdOf("C-1"),
    "kits[0].parts[2].partId": partIdOf("F-1"),
    ...Object.fromEntries(Object.entries(first).map(([key, value]) => [`kits[0].${key}`, value])),
    "kits[1].kitId": secondKitId,
    "kits[1].parts[0].partId": partIdOf("S-2"),
    "kits[1].parts[1].partId": partIdOf("C-2"),
    ...Object.fromEntries(Object.entries(second).map(([key, value]) => [`kits[1].${key}`, value])),
  });

  async function nothingChanged() {
    expect([(await kitRow(fixture.kitId)).state, (await kitRow(secondKitId)).state]).toEqual(["coming_back", "coming_back"]);
    const events = await db
      .select()
      .from(partEvents)
      .where(and(eq(partEvents.action, "checked_in"), inArray(partEvents.partId, ["S-1", "C-1", "F-1", "S-2", "C-2"].map(partIdOf))));
    expect(events).toEqual([]);
  }

  it("lists the chosen kits coming back with each part, and leaves out one that is not", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const [other] = await db.insert(kits).values({ courseId: fixture.courseId, number: "K-09", state: "on_shelf" }).returning();
    const query = [fixture.kitId, secondKitId, other.id].map((id) => `kit=${id}`).join("&");
    const page = await (await handle(appRequest(`/courses/${fixture.courseId}/kits/check-in?${query}`, { cookie }))).text();
    for (const label of ["Kit K-01", "Kit K-02", "S-1", "C-1", "F-1", "S-2", "C-2"]) expect(page).toContain(label);
    expect(page).not.toContain("Kit K-09");
    expect(page).toContain("1 chosen kit is not coming back");

    // Nothing chosen (the kits list's selection needs JavaScript): the kits coming back, to tick here.
    const chooser = await (await handle(appRequest(`/courses/${fixture.courseId}/kits/check-in`, { cookie }))).text();
    expect(chooser).toContain("Kits coming back");
    expect(chooser).toContain("Kit K-02");
    expect(chooser).not.toContain("Kit K-09");
  });

  it("refuses a part without a condition, at that part, and changes nothing", async () => {
    const response = await post(form({ allFine: "on" }, { "parts[0].condition": "damaged" }));
    expect(response.status).toBe(400);
    expect(await response.text()).toContain("Choose this part&#x27;s condition, or tick all parts fine.");
    await nothingChanged();
  });

  it("refuses a damaged part under a ticked all-parts-fine box", async () => {
    const response = await post(form({ allFine: "on", "parts[0].condition": "missing" }, { allFine: "on" }));
    expect(response.status).toBe(400);
    expect(await response.text()).toContain("Marked missing: untick all parts fine for this kit.");
    await nothingChanged();
  });

  it("checks in all the kits or none: a kit that is not coming back stops the others", async () => {
    const [atHome] = await db
      .insert(kits)
      .values({
        courseId: fixture.courseId,
        number: "K-05",
        state: "at_home",
        holderMembershipId: fixture.membershipIds.otherCohortStudent,
      })
      .returning();
    const response = await post({ ...form({ allFine: "on" }, { allFine: "on" }), "kits[2].kitId": atHome.id, "kits[2].allFine": "on" });
    expect(response.status).toBe(400);
    expect(await response.text()).toMatch(/Kit K-05 \(at home\)/);
    await nothingChanged();
    // The server itself requires every part's condition, whatever the form sent.
    await expect(
      checkInKits(db, {
        courseId: fixture.courseId,
        actorId: fixture.userIds.instructor,
        kits: [
          {
            kitId: fixture.kitId,
            conditions: { [partIdOf("S-1")]: "fine", [partIdOf("C-1")]: "fine", [partIdOf("F-1")]: "fine" },
            remeasure: [],
          },
          { kitId: secondKitId, conditions: { [partIdOf("S-2")]: "fine" }, remeasure: [] },
        ],
      }),
    ).rejects.toThrow(/kit K-02 has parts without one/);
    await nothingChanged();
  });

  it("checks in one kit with the all-fine shortcut and another with a damaged sphere, which is retired", async () => {
    const response = await post(
      form({ allFine: "on", "parts[1].remeasure": "on" }, { "parts[0].condition": "damaged", "parts[1].condition": "fine" }),
    );
    expect(response.status).toBe(200);
    expect(await kitRow(fixture.kitId)).toMatchObject({ state: "checked_in", holderMembershipId: null });
    expect(await kitRow(secondKitId)).toMatchObject({ state: "checked_in", holderMembershipId: null });
    const statuses = await db
      .select({ label: parts.label, status: parts.status })
      .from(parts)
      .where(inArray(parts.id, ["S-1", "C-1", "F-1", "S-2", "C-2"].map(partIdOf)));
    expect(Object.fromEntries(statuses.map((part) => [part.label, part.status]))).toEqual({
      "S-1": "in_service",
      "C-1": "remeasure",
      "F-1": "in_service",
      "S-2": "retired",
      "C-2": "in_service",
    });
    const stillInSecond = await db.select({ partId: kitParts.partId }).from(kitParts).where(eq(kitParts.kitId, secondKitId));
    expect(stillInSecond.map((row) => row.partId)).toEqual([partIdOf("C-2")]);
    const recorded = await db
      .select({ partId: partEvents.partId, detail: partEvents.detail })
      .from(partEvents)
      .where(and(eq(partEvents.action, "checked_in"), inArray(partEvents.partId, ["S-1", "C-1", "F-1"].map(partIdOf))));
    expect(recorded.filter((event) => event.detail.kitId === fixture.kitId).map((event) => event.detail.condition)).toEqual([
      "fine",
      "fine",
      "fine",
    ]);
    const kitHistory = await db
      .select({ detail: kitEvents.detail })
      .from(kitEvents)
      .where(and(eq(kitEvents.kitId, secondKitId), eq(kitEvents.action, "checked_in")));
    expect(kitHistory[0].detail.conditions).toEqual({ [partIdOf("S-2")]: "damaged", [partIdOf("C-2")]: "fine" });
  });

  it("runs the same statements for two kits as for twenty", async () => {
    const course = await createAccessFixture("check-in-statements");
    const kitsWithParts = async (count: number, prefix: string) => {
      const made = await db
        .insert(kits)
        .values(
          Array.from({ length: count }, (_, index) => ({
            courseId: course.courseId,
            number: `${prefix}-${index}`,
            state: "coming_back" as const,
          })),
        )
        .returning({ id: kits.id });
      const spheres = await db
        .insert(parts)
        .values(
          made.map((_, index) => ({
            courseId: course.courseId,
            kind: "sphere" as const,
            label: `${prefix}-S${index}`,
            material: "steel",
            diameterMm: 3,
            massG: 0.11,
          })),
        )
        .returning({ id: parts.id });
      await db.insert(kitParts).values(made.map((kit, index) => ({ kitId: kit.id, partId: spheres[index].id })));
      // One damaged sphere and one sent for re-measuring in every batch, so that every statement runs.
      return made.map((kit, index) => ({
        kitId: kit.id,
        conditions: { [spheres[index].id]: index === 0 ? ("damaged" as const) : ("fine" as const) },
        remeasure: index === made.length - 1 && index > 0 ? [spheres[index].id] : [],
      }));
    };
    const run = (checkIns: Awaited<ReturnType<typeof kitsWithParts>>) =>
      countStatements(() => checkInKits(db, { courseId: course.courseId, actorId: course.userIds.instructor, kits: checkIns }));
    const two = await run([
      ...(await kitsWithParts(1, "ONE")),
      ...(await kitsWithParts(1, "TWO")).map((kit) => ({ ...kit, remeasure: Object.keys(kit.conditions) })),
    ]);
    const twenty = await run(await kitsWithParts(20, "MANY"));
    expect(twenty.result.checkedIn).toBe(20);
    expect(twenty.statements).toBe(two.statements);
  });

  it("is no longer offered as a plain bulk move on the kits list", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const [kit] = await db.insert(kits).values({ courseId: fixture.courseId, number: "K-06", state: "coming_back" }).returning();
    const response = await handle(
      appRequest(`/courses/${fixture.courseId}/kits`, { cookie, form: { intent: "bulk-move", to: "checked_in", kitIds: kit.id } }),
    );
    expect(response.status).toBe(400);
    expect((await kitRow(kit.id)).state).toBe("coming_back");
  });
});
