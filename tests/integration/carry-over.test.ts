/**
 * "Start next term from this course": the new course gets exactly the settings, cohorts, labs (drafts,
 * dates moved by calendar days across a daylight-saving change), rubrics, method settings, inventory
 * and instructors it should, and nothing of the students; in a constant number of statements.
 */
import { randomUUID } from "node:crypto";
import { and, asc, eq, inArray, sql, type SQL } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import {
  auditEvents,
  cohorts,
  courseMemberships,
  courses,
  dropLogs,
  emailOutbox,
  invitations,
  kitEvents,
  kitParts,
  kits,
  labCohorts,
  labExtensions,
  labs,
  marks,
  partEvents,
  parts,
  rubricCriteria,
  shippingAddresses,
  taCohortAssignments,
  users,
} from "~/db/schema";
import type { CarryOverInput } from "~/lib/courses/carry-over-input";
import type { CourseAccess } from "~/server/auth/access.server";
import { carryOverCourse } from "~/server/courses/carry-over.server";
import { db } from "~/server/db.server";
import { countAllStatements } from "../support/count-statements";

const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };

/** A finished course in Dublin with two cohorts, staff, `size` students and `size` extra spheres, labs, rubric, kits and student work. */
async function sourceCourse(label: string, size = 2) {
  const [course] = await db
    .insert(courses)
    .values({
      title: "Fluids at Home",
      code: `${label}-FM`,
      term: "2026 Spring",
      timeZone: "Europe/Dublin",
      localGravity: 9.8133,
      partBiasAlpha: 0.01,
      returnAddress: { name: "Fluids Lab", line1: "1 Quay Street", city: "Galway", country: "IE" },
      kitReturnBy: "2026-05-29",
      kitReturnReminderDays: [2, 5],
      markBookDropLowest: 1,
    })
    .returning();
  const [cohortA, cohortB] = await db
    .insert(cohorts)
    .values([
      { courseId: course.id, name: "Tuesday bench" },
      { courseId: course.id, name: "Thursday bench" },
    ])
    .returning();
  const people = await db
    .insert(users)
    .values([
      { email: `actor@${label}.example`, name: "Dr Actor" },
      { email: `colleague@${label}.example`, name: "Dr Colleague" },
      { email: `gone@${label}.example`, name: "Dr Gone" },
      { email: `ta@${label}.example`, name: "A TA" },
      ...Array.from({ length: size }, (_, index) => ({ email: `student${index}@${label}.example`, name: `Student ${index}` })),
    ])
    .returning({ id: users.id });
  const [actor, colleague, gone, ta, ...students] = people.map((person) => person.id);
  const memberships = await db
    .insert(courseMemberships)
    .values([
      { courseId: course.id, userId: actor, role: "instructor" as const },
      { courseId: course.id, userId: colleague, role: "instructor" as const },
      { courseId: course.id, userId: gone, role: "instructor" as const, removedAt: new Date() },
      { courseId: course.id, userId: ta, role: "ta" as const },
      ...students.map((userId, index) => ({
        courseId: course.id,
        userId,
        role: "student" as const,
        cohortId: index % 2 ? cohortB.id : cohortA.id,
      })),
    ])
    .returning({ id: courseMemberships.id });
  const [actorMembership, , , taMembership, firstStudent] = memberships.map((membership) => membership.id);
  await db.insert(taCohortAssignments).values({ membershipId: taMembership, cohortId: cohortA.id });
  await db.insert(invitations).values({
    courseId: course.id,
    email: `invited@${label}.example`,
    role: "student",
    cohortId: cohortA.id,
    tokenHash: randomUUID(),
    expiresAt: new Date(Date.now() + 86_400_000),
  });

  const [sphere, column, fluidLot, retired] = await db
    .insert(parts)
    .values([
      { courseId: course.id, kind: "sphere", label: "S-1", material: "steel", diameterMm: 3.175, massG: 0.1305, status: "remeasure" },
      { courseId: course.id, kind: "column", label: "C-1", innerDiameterMm: 40.2, timedDistanceMm: 200, runInMm: 100 },
      {
        courseId: course.id,
        kind: "fluid_lot",
        label: "F-1",
        fluidName: "glycerol",
        densityKgM3: 1258,
        calibration: [{ temperatureC: 20, viscosityPaS: 1.41 }],
        bottlesOnHand: 12,
      },
      { courseId: course.id, kind: "sphere", label: "R-1", material: "glass", diameterMm: 4, massG: 0.08, status: "retired" },
      ...Array.from({ length: size }, (_, index) => ({
        courseId: course.id,
        kind: "sphere" as const,
        label: `X-${index}`,
        material: "steel",
        diameterMm: 2,
        massG: 0.03,
      })),
    ])
    .returning();
  await db.insert(partEvents).values([
    { partId: sphere.id, actorId: actor, action: "created", createdAt: new Date("2026-01-10T10:00:00Z") },
    {
      partId: sphere.id,
      actorId: actor,
      action: "remeasured",
      detail: { changed: { diameterMm: { from: 3.17, to: 3.175 } } },
      createdAt: new Date("2026-02-01T10:00:00Z"),
    },
    { partId: sphere.id, actorId: actor, action: "status:remeasure", note: "Chipped?" },
    { partId: column.id, actorId: actor, action: "created" },
    // About the old course's kits and students: stays behind.
    { partId: column.id, actorId: actor, action: "checked_in", detail: { condition: "fine" } },
    { partId: retired.id, actorId: actor, action: "created" },
  ]);
  const [shelfKit, homeKit] = await db
    .insert(kits)
    .values([
      { courseId: course.id, number: "K-01", state: "on_shelf" },
      { courseId: course.id, number: "K-02", state: "at_home", holderMembershipId: firstStudent },
    ])
    .returning();
  await db.insert(kitParts).values([
    { kitId: shelfKit.id, partId: sphere.id },
    { kitId: shelfKit.id, partId: fluidLot.id, exclusive: false },
    { kitId: homeKit.id, partId: column.id },
    { kitId: homeKit.id, partId: fluidLot.id, exclusive: false },
  ]);

  // Dublin is on GMT until 29 March 2026, on IST (UTC+1) after: the first lab is due before the change.
  const [dragLab, viscometryLab] = await db
    .insert(labs)
    .values([
      {
        courseId: course.id,
        title: "Drag on a steel sphere",
        kind: "drag",
        status: "closed",
        instructions: "Time ten drops.",
        opensAt: new Date("2026-03-16T09:00:00Z"),
        dueAt: new Date("2026-03-20T23:59:00Z"),
        lateCutoffAt: new Date("2026-03-22T23:59:00Z"),
        requiredDrops: 12,
        allowedPartIds: [sphere.id, retired.id],
        wallCorrection: "francis",
        comparisonMethod: "iqr",
        comparisonK: 2,
        resolutions,
        reminderOffsetsHours: [24],
        afterReleaseHandIns: "reopen",
        publishedAt: new Date("2026-03-10T09:00:00Z"),
        markWeight: 2,
      },
      {
        courseId: course.id,
        title: "Viscosity of glycerol",
        kind: "viscometry",
        status: "draft",
        opensAt: new Date("2026-04-13T08:00:00Z"),
        dueAt: new Date("2026-04-17T16:00:00Z"),
        resolutions,
      },
    ])
    .returning();
  await db.insert(labCohorts).values([
    { labId: dragLab.id, cohortId: cohortA.id },
    { labId: viscometryLab.id, cohortId: cohortA.id },
    { labId: viscometryLab.id, cohortId: cohortB.id },
  ]);
  await db.insert(rubricCriteria).values([
    { labId: dragLab.id, position: 1, title: "Method", kind: "range", maxPoints: 5, description: "Is the method sound?" },
    { labId: dragLab.id, position: 2, title: "Agrees with the class", kind: "auto", autoRule: "not_outlier", maxPoints: 3 },
    {
      labId: dragLab.id,
      position: 3,
      title: "Write-up",
      kind: "levels",
      levels: [
        { points: 0, description: "Poor" },
        { points: 2, description: "Good" },
      ],
      maxPoints: 2,
    },
  ] as (typeof rubricCriteria.$inferInsert)[]);

  // The students' work, none of which may come along.
  const [dropLog] = await db.insert(dropLogs).values({ labId: dragLab.id, membershipId: firstStudent }).returning();
  await db.insert(marks).values({ labId: dragLab.id, membershipId: firstStudent, total: 7, markedById: actor });
  await db.insert(labExtensions).values({
    labId: dragLab.id,
    membershipId: firstStudent,
    dueAt: new Date("2026-03-25T23:59:00Z"),
    reason: "Ill",
  });
  await db.insert(shippingAddresses).values({
    courseId: course.id,
    membershipId: firstStudent,
    name: "Student 0",
    line1: "2 Main Street",
    city: "Cork",
    country: "IE",
  });
  await db.insert(emailOutbox).values({
    toAddress: `student0@${label}.example`,
    template: "deadline-reminder",
    props: {},
    subject: "Due soon",
    courseId: course.id,
  });

  const access = {
    user: { id: actor, email: `actor@${label}.example`, name: "Dr Actor", mayCreateCourses: true, sessionId: null, via: "session" },
    course: { id: course.id, title: course.title, code: course.code, term: course.term, timeZone: course.timeZone, archivedAt: null },
    membership: { id: actorMembership, role: "instructor", cohortId: null },
    cohortIds: [cohortA.id, cohortB.id],
  } as CourseAccess;
  return { course, access, actor, colleague, dragLab, viscometryLab, dropLog, sphere, retired };
}

const nextTerm = (label: string, overrides: Partial<CarryOverInput> = {}): CarryOverInput => ({
  title: "Fluids at Home",
  code: `${label}-FM`,
  term: "2026 Autumn",
  timeZone: "Europe/Dublin",
  shiftDays: 14,
  copyCohorts: true,
  ...overrides,
});

const count = async (table: string, where: SQL) =>
  (await db.execute<{ n: number }>(sql`select count(*)::int as n from ${sql.identifier(table)} where ${where}`)).rows[0].n;

describe("carrying a course over", () => {
  it("copies the settings, cohorts, labs as drafts with their dates moved by calendar days, rubrics and the inventory", async () => {
    const source = await sourceCourse("carry");
    const { courseId } = await carryOverCourse(db, { access: source.access, input: nextTerm("carry") });

    const [course] = await db.select().from(courses).where(eq(courses.id, courseId));
    expect(course).toMatchObject({
      title: "Fluids at Home",
      code: "carry-FM",
      term: "2026 Autumn",
      timeZone: "Europe/Dublin",
      partBiasAlpha: 0.01,
      returnAddress: { name: "Fluids Lab", line1: "1 Quay Street", city: "Galway", country: "IE" },
      // 29 May + 14 days.
      kitReturnBy: "2026-06-12",
      kitReturnReminderDays: [2, 5],
      markBookDropLowest: 1,
      carriedFromId: source.course.id,
      archivedAt: null,
    });
    expect(course.localGravity).toBeCloseTo(9.8133, 4);

    const newCohorts = await db.select({ id: cohorts.id, name: cohorts.name }).from(cohorts).where(eq(cohorts.courseId, courseId));
    expect(newCohorts.map((cohort) => cohort.name).sort()).toEqual(["Thursday bench", "Tuesday bench"]);
    const cohortName = new Map(newCohorts.map((cohort) => [cohort.id, cohort.name]));

    const newLabs = await db.select().from(labs).where(eq(labs.courseId, courseId)).orderBy(asc(labs.opensAt));
    expect(newLabs).toHaveLength(2);
    const [drag, viscometry] = newLabs;
    expect(newLabs.map((lab) => [lab.status, lab.publishedAt])).toEqual([
      ["draft", null],
      ["draft", null],
    ]);
    // 16 March 09:00 GMT + 14 days is 30 March 09:00 IST, 08:00 UTC; 23:59 GMT on 20 March is 23:59 IST on 3 April.
    // Fourteen days of 24 hours would have put the due time at 00:59 the next morning.
    expect(drag.opensAt.toISOString()).toBe("2026-03-30T08:00:00.000Z");
    expect(drag.dueAt.toISOString()).toBe("2026-04-03T22:59:00.000Z");
    expect(drag.lateCutoffAt?.toISOString()).toBe("2026-04-05T22:59:00.000Z");
    expect(viscometry.opensAt.toISOString()).toBe("2026-04-27T08:00:00.000Z");
    expect(viscometry.lateCutoffAt).toBeNull();
    expect(drag).toMatchObject({
      title: "Drag on a steel sphere",
      kind: "drag",
      instructions: "Time ten drops.",
      requiredDrops: 12,
      wallCorrection: "francis",
      dragModel: "schiller-naumann",
      comparisonMethod: "iqr",
      comparisonK: 2,
      resolutions,
      reminderOffsetsHours: [24],
      afterReleaseHandIns: "reopen",
      markWeight: 2,
    });
    expect(source.dragLab.id).not.toBe(drag.id);

    // Allowed parts point at the new course's copy of S-1; the retired R-1 stayed behind.
    const newParts = await db.select().from(parts).where(eq(parts.courseId, courseId));
    const newSphere = newParts.find((part) => part.label === "S-1")!;
    expect(drag.allowedPartIds).toEqual([newSphere.id]);
    expect(newParts.map((part) => part.label).sort()).toEqual(["C-1", "F-1", "S-1", "X-0", "X-1"]);
    expect(newSphere).toMatchObject({ kind: "sphere", material: "steel", diameterMm: 3.175, massG: 0.1305, status: "remeasure" });
    expect(newParts.find((part) => part.label === "F-1")).toMatchObject({
      densityKgM3: 1258,
      calibration: [{ temperatureC: 20, viscosityPaS: 1.41 }],
      bottlesOnHand: 12,
    });
    const history = await db
      .select({
        label: parts.label,
        action: partEvents.action,
        note: partEvents.note,
        detail: partEvents.detail,
        createdAt: partEvents.createdAt,
      })
      .from(partEvents)
      .innerJoin(parts, eq(parts.id, partEvents.partId))
      .where(eq(parts.courseId, courseId))
      .orderBy(asc(parts.label), asc(partEvents.createdAt));
    expect(history.map((event) => `${event.label} ${event.action}`)).toEqual([
      "C-1 created",
      "S-1 created",
      "S-1 remeasured",
      "S-1 status:remeasure",
    ]);
    expect(history[2].detail).toEqual({ changed: { diameterMm: { from: 3.17, to: 3.175 } } });
    expect(history[1].createdAt.toISOString()).toBe("2026-01-10T10:00:00.000Z");

    // The kit on the shelf came along with its contents; the kit at a student's home did not.
    const newKits = await db.select().from(kits).where(eq(kits.courseId, courseId));
    expect(newKits.map((kit) => [kit.number, kit.state, kit.holderMembershipId])).toEqual([["K-01", "on_shelf", null]]);
    const contents = await db
      .select({ label: parts.label, exclusive: kitParts.exclusive })
      .from(kitParts)
      .innerJoin(parts, eq(parts.id, kitParts.partId))
      .where(eq(kitParts.kitId, newKits[0].id))
      .orderBy(asc(parts.label));
    expect(contents).toEqual([
      { label: "F-1", exclusive: false },
      { label: "S-1", exclusive: true },
    ]);
    const [kitEvent] = await db.select().from(kitEvents).where(eq(kitEvents.kitId, newKits[0].id));
    expect(kitEvent).toMatchObject({ action: "created", toState: "on_shelf", note: "Carried over from carry-FM 2026 Spring." });

    const cohortsOfLabs = await db
      .select({ lab: labCohorts.labId, cohort: labCohorts.cohortId })
      .from(labCohorts)
      .where(inArray(labCohorts.labId, [drag.id, viscometry.id]));
    expect(cohortsOfLabs.map((row) => `${row.lab === drag.id ? "drag" : "viscometry"} ${cohortName.get(row.cohort)}`).sort()).toEqual([
      "drag Tuesday bench",
      "viscometry Thursday bench",
      "viscometry Tuesday bench",
    ]);

    const criteria = await db.select().from(rubricCriteria).where(eq(rubricCriteria.labId, drag.id)).orderBy(asc(rubricCriteria.position));
    expect(
      criteria.map(({ position, title, description, kind, levels, minPoints, maxPoints, autoRule, autoParams }) => ({
        position,
        title,
        description,
        kind,
        levels,
        minPoints,
        maxPoints,
        autoRule,
        autoParams,
      })),
    ).toEqual([
      {
        position: 1,
        title: "Method",
        description: "Is the method sound?",
        kind: "range",
        levels: null,
        minPoints: 0,
        maxPoints: 5,
        autoRule: null,
        autoParams: {},
      },
      {
        position: 2,
        title: "Agrees with the class",
        description: "",
        kind: "auto",
        levels: null,
        minPoints: 0,
        maxPoints: 3,
        autoRule: "not_outlier",
        autoParams: {},
      },
      {
        position: 3,
        title: "Write-up",
        description: "",
        kind: "levels",
        levels: [
          { points: 0, description: "Poor" },
          { points: 2, description: "Good" },
        ],
        minPoints: 0,
        maxPoints: 2,
        autoRule: null,
        autoParams: {},
      },
    ]);
    expect(await count("rubric_criteria", sql`lab_id = ${viscometry.id}`)).toBe(0);

    const audit = await db
      .select({ courseId: auditEvents.courseId, action: auditEvents.action, subject: auditEvents.subject })
      .from(auditEvents)
      .where(eq(auditEvents.action, "course.carried_over"));
    expect(audit).toEqual(
      expect.arrayContaining([
        { courseId: source.course.id, action: "course.carried_over", subject: `course:${courseId}` },
        { courseId, action: "course.carried_over", subject: `course:${source.course.id}` },
      ]),
    );
  });

  it("takes the instructors and nothing of the students", async () => {
    const source = await sourceCourse("people");
    const { courseId } = await carryOverCourse(db, { access: source.access, input: nextTerm("people") });
    const members = await db
      .select({ userId: courseMemberships.userId, role: courseMemberships.role, cohortId: courseMemberships.cohortId })
      .from(courseMemberships)
      .where(eq(courseMemberships.courseId, courseId));
    // The removed instructor, the TA and the students stay behind.
    expect(members.sort((a, b) => a.userId.localeCompare(b.userId))).toEqual(
      [source.actor, source.colleague].sort().map((userId) => ({ userId, role: "instructor", cohortId: null })),
    );
    expect(await count("ta_cohort_assignments", sql`cohort_id in (select id from cohorts where course_id = ${courseId})`)).toBe(0);
    for (const table of ["invitations", "shipping_addresses", "email_outbox", "shipments", "kit_problems"])
      expect(await count(table, sql`course_id = ${courseId}`), table).toBe(0);
    for (const table of ["drop_logs", "marks", "lab_extensions", "lab_reminders", "lab_marking", "comparison_labels"])
      expect(await count(table, sql`lab_id in (select id from labs where course_id = ${courseId})`), table).toBe(0);
    // Only the carry-over itself is in the new course's audit.
    expect(await count("audit_events", sql`course_id = ${courseId} and action <> 'course.carried_over'`)).toBe(0);
    // The old course is untouched: its student work is all still there.
    expect(await count("drop_logs", sql`id = ${source.dropLog.id}`)).toBe(1);
    expect(await count("course_memberships", sql`course_id = ${source.course.id}`)).toBe(6);
  });

  it("without the cohorts copies no cohort and sets no lab for one", async () => {
    const source = await sourceCourse("alone");
    const { courseId } = await carryOverCourse(db, { access: source.access, input: nextTerm("alone", { copyCohorts: false }) });
    expect(await count("cohorts", sql`course_id = ${courseId}`)).toBe(0);
    expect(await count("labs", sql`course_id = ${courseId}`)).toBe(2);
    expect(await count("lab_cohorts", sql`lab_id in (select id from labs where course_id = ${courseId})`)).toBe(0);
  });

  it("keeps the labs' local times in a new time zone", async () => {
    const source = await sourceCourse("zone");
    const { courseId } = await carryOverCourse(db, {
      access: source.access,
      input: nextTerm("zone", { timeZone: "America/Toronto", shiftDays: 0 }),
    });
    const [drag] = await db
      .select()
      .from(labs)
      .where(and(eq(labs.courseId, courseId), eq(labs.kind, "drag")));
    // 20 March 23:59 in Dublin (GMT) becomes 23:59 in Toronto (EDT, UTC−4).
    expect(drag.dueAt.toISOString()).toBe("2026-03-21T03:59:00.000Z");
  });

  it("refuses a code and term that another course has, and creates nothing", async () => {
    const source = await sourceCourse("clash");
    const before = await count("courses", sql`true`);
    await expect(carryOverCourse(db, { access: source.access, input: nextTerm("clash", { term: "2026 Spring" }) })).rejects.toMatchObject({
      code: "course_exists",
      field: "code",
    });
    expect(await count("courses", sql`true`)).toBe(before);
  });

  it("runs the same number of statements for 10 and for 1,000 students and parts", async () => {
    const small = await sourceCourse("small", 10);
    const large = await sourceCourse("large", 1000);
    const smallRun = await countAllStatements(() => carryOverCourse(db, { access: small.access, input: nextTerm("small") }));
    const largeRun = await countAllStatements(() => carryOverCourse(db, { access: large.access, input: nextTerm("large") }));
    expect(largeRun.statements).toBe(smallRun.statements);
    expect(await count("parts", sql`course_id = ${largeRun.result.courseId}`)).toBe(1003);
  });
});
