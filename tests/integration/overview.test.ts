/**
 * The course overviews, for a seeded class: what each item of the instructor's, the TA's and the
 * student's overview says, and that each costs the same statements for 10 and for 1,000 students.
 */
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import {
  cohorts,
  comparisonLabels,
  courseMemberships,
  courses,
  dropLogs,
  dropLogVersions,
  invitations,
  kits,
  labCohorts,
  labExtensions,
  labs,
  marks,
  rubricCriteria,
  taCohortAssignments,
  users,
} from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import { instructorOverview, studentOverview, taOverview } from "~/server/courses/overview.server";
import { db } from "~/server/db.server";
import { loadMarkingDesk } from "~/server/marking/marking-desk.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { appRequest, createAppHandler, sessionCookieFor } from "../support/app-requests";
import { countStatements } from "../support/count-statements";
import { seedMarkingClass } from "../support/marking-class";

const day = 24 * 3600 * 1000;
const now = new Date();
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };

const accessOf = (
  courseId: string,
  {
    userId,
    membershipId,
    role,
    cohortIds,
  }: { userId: string; membershipId: string; role: "instructor" | "ta" | "student"; cohortIds: string[] },
) =>
  ({
    user: { id: userId, email: `${userId}@overview.example`, name: "Viewer", sessionId: null, via: "session" },
    course: { id: courseId, title: "Settling Spheres", code: "overview", term: "Test term", timeZone: "UTC", archivedAt: null },
    membership: { id: membershipId, role, cohortId: role === "student" ? cohortIds[0] : null },
    cohortIds,
  }) as CourseAccess;

describe("the overviews of a seeded class", () => {
  let fixture: AccessFixture;
  let recentLab: string;
  let extensionDue: Date;
  const who = (actor: "ownStudent" | "sameCohortStudent" | "otherCohortStudent" | "assignedTa" | "unassignedTa" | "instructor") => {
    const role = actor === "instructor" ? "instructor" : actor.endsWith("Ta") ? "ta" : "student";
    const cohortIds =
      actor === "instructor"
        ? [fixture.cohortId, fixture.otherCohortId]
        : actor === "otherCohortStudent" || actor === "unassignedTa"
          ? [fixture.otherCohortId]
          : [fixture.cohortId];
    return accessOf(fixture.courseId, { userId: fixture.userIds[actor], membershipId: fixture.membershipIds[actor], role, cohortIds });
  };

  beforeAll(async () => {
    // The fixture: cohorts one and two, a lab of cohort one due in a week that ownStudent has handed in (version 1).
    fixture = await createAccessFixture("overview");
    const [criterion] = await db
      .insert(rubricCriteria)
      .values({ labId: fixture.labId, position: 0, title: "Method", kind: "range", maxPoints: 5 })
      .returning();
    const [counted] = await db
      .select({ id: dropLogVersions.id })
      .from(dropLogVersions)
      .where(eq(dropLogVersions.dropLogId, fixture.dropLogId));
    // assignedTa has marked ownStudent's hand-in, every criterion scored.
    await db.insert(marks).values({
      labId: fixture.labId,
      membershipId: fixture.membershipIds.ownStudent,
      dropLogVersionId: counted.id,
      scores: { [criterion.id]: { points: 4 } },
      total: 4,
      markedById: fixture.userIds.assignedTa,
    });
    await db.insert(comparisonLabels).values({
      dropLogId: fixture.dropLogId,
      labId: fixture.labId,
      versionId: counted.id,
      figure: 1.4,
      label: "outlier",
      reason: "far from the class",
      method: { method: "grubbs", alpha: 0.05, maxOutliers: 3, k: 1.5 },
    });

    // A lab of both cohorts due yesterday, late hand-ins for two more days; a draft and a lab long past are not deadlines.
    const [recent, draft, past] = await db
      .insert(labs)
      .values([
        {
          courseId: fixture.courseId,
          title: "Viscosity of the fluid lot",
          kind: "drag",
          status: "published",
          opensAt: new Date(now.getTime() - 5 * day),
          dueAt: new Date(now.getTime() - day),
          lateCutoffAt: new Date(now.getTime() + 2 * day),
          resolutions,
        },
        {
          courseId: fixture.courseId,
          title: "Draft lab",
          kind: "drag",
          status: "draft",
          opensAt: now,
          dueAt: new Date(now.getTime() + day),
          resolutions,
        },
        {
          courseId: fixture.courseId,
          title: "Long past",
          kind: "drag",
          status: "published",
          opensAt: new Date(now.getTime() - 30 * day),
          dueAt: new Date(now.getTime() - 10 * day),
          resolutions,
        },
      ])
      .returning();
    recentLab = recent.id;
    await db.insert(labCohorts).values([
      { labId: recent.id, cohortId: fixture.cohortId },
      { labId: recent.id, cohortId: fixture.otherCohortId },
      { labId: draft.id, cohortId: fixture.cohortId },
      { labId: past.id, cohortId: fixture.cohortId },
    ]);
    // ownStudent handed in late; sameCohortStudent's own due time is still ahead; otherCohortStudent's has passed.
    const [log] = await db.insert(dropLogs).values({ labId: recent.id, membershipId: fixture.membershipIds.ownStudent }).returning();
    const [version] = await db
      .insert(dropLogVersions)
      .values({
        dropLogId: log.id,
        version: 1,
        idempotencyKey: "overview-late",
        submittedAt: new Date(now.getTime() - day / 2),
        late: true,
        input: { temperatureC: 21 } as never,
        kitRecords: {} as never,
        reduction: {} as never,
        normalisedFigure: 1,
      })
      .returning();
    await db.update(dropLogs).set({ latestVersionId: version.id }).where(eq(dropLogs.id, log.id));
    extensionDue = new Date(now.getTime() + 3 * day);
    await db
      .insert(labExtensions)
      .values({ labId: recent.id, membershipId: fixture.membershipIds.sameCohortStudent, dueAt: extensionDue, reason: "illness" });

    await db.insert(kits).values({ courseId: fixture.courseId, number: "K-02", state: "packed" });
    const open = { courseId: fixture.courseId, role: "student" as const, expiresAt: new Date(now.getTime() + day) };
    const [replacement] = await db
      .insert(invitations)
      .values({ ...open, email: "waiting@overview.example", tokenHash: randomUUID() })
      .returning();
    await db.insert(invitations).values([
      { ...open, email: "expired@overview.example", tokenHash: randomUUID(), expiresAt: new Date(now.getTime() - day) },
      { ...open, email: "revoked@overview.example", tokenHash: randomUUID(), revokedAt: now },
      { ...open, email: "waiting@overview.example", tokenHash: randomUUID(), replacedById: replacement.id },
      { ...open, email: "joined@overview.example", tokenHash: randomUUID(), acceptedAt: now },
    ]);
  });

  it("the instructor's says each cohort's hand-ins, each TA's marking, the flags, the kits and the invitations", async () => {
    const overview = await instructorOverview(db, who("instructor"), now);
    // Due yesterday (late hand-ins still taken) comes before due in a week; the draft and the long-past lab are left out.
    expect(overview.deadlines.map((lab) => lab.title)).toEqual(["Viscosity of the fluid lot", "Drag on a steel sphere"]);
    expect(overview.deadlines[0].cohorts).toEqual([
      // sameCohortStudent has an extension to a later due time, so only otherCohortStudent is missing.
      { cohortId: fixture.cohortId, cohortName: "Cohort one", students: 2, handedIn: 1, late: 1, missing: 0, extended: 1 },
      { cohortId: fixture.otherCohortId, cohortName: "Cohort two", students: 1, handedIn: 0, late: 0, missing: 1, extended: 0 },
    ]);
    expect(overview.deadlines[1].cohorts).toEqual([
      { cohortId: fixture.cohortId, cohortName: "Cohort one", students: 2, handedIn: 1, late: 0, missing: 0, extended: 0 },
    ]);
    expect(overview.tas).toEqual([
      {
        membershipId: fixture.membershipIds.assignedTa,
        name: "Test assignedTa",
        cohortCount: 1,
        marked: 1,
        toMark: 1,
        labs: [{ labId: recentLab, title: "Viscosity of the fluid lot", toMark: 1 }],
      },
      // Cohort two has handed nothing in: nothing to mark, nothing marked, and still listed.
      { membershipId: fixture.membershipIds.unassignedTa, name: "Test unassignedTa", cohortCount: 1, marked: 0, toMark: 0, labs: [] },
    ]);
    expect(overview.comparisonFlags).toEqual([{ labId: fixture.labId, title: "Drag on a steel sphere", outliers: 1, suspects: 0 }]);
    expect(overview.flaggedParts).toEqual([]);
    expect(overview.kitsByState).toEqual({ at_home: 1, packed: 1 });
    expect(overview.overdueKits).toBe(0);
    expect(overview.failedEmails).toEqual([]);
    // Only the one invitation neither expired, revoked, replaced nor accepted.
    expect(overview.invitations).toEqual({ open: 1, students: 1 });
  });

  it("the pages say so to each role, linking each item to where it is dealt with", async () => {
    const handle = await createAppHandler();
    const html = async (actor: "instructor" | "assignedTa" | "ownStudent") => {
      const response = await handle(appRequest(`/courses/${fixture.courseId}`, { cookie: await sessionCookieFor(fixture.userIds[actor]) }));
      expect(response.status).toBe(200);
      // React marks where text pieces meet with empty comments.
      return (await response.text()).replaceAll("<!-- -->", "");
    };
    const forInstructor = await html("instructor");
    expect(forInstructor).toContain(`href="/courses/${fixture.courseId}/labs/${recentLab}/dashboard"`);
    expect(forInstructor).toContain(`href="/courses/${fixture.courseId}/labs/${recentLab}/marking?status=waiting"`);
    expect(forInstructor).toContain(`href="/courses/${fixture.courseId}/labs/${fixture.labId}/comparison"`);
    expect(forInstructor).toContain("nothing marked yet");
    // Only the labels that occur are named.
    expect(forInstructor).toContain("</a>: 1 outlier in the class comparison");
    expect(forInstructor).toContain("1 invitation not accepted yet");
    expect(forInstructor).toContain("1 kit not delivered yet");
    const forTa = await html("assignedTa");
    expect(forTa).toContain(`href="/courses/${fixture.courseId}/labs/${recentLab}/marking/students/${fixture.membershipIds.ownStudent}"`);
    expect(forTa).not.toContain("invitation");
    const forStudent = await html("ownStudent");
    expect(forStudent).toContain(`href="/courses/${fixture.courseId}/labs/${recentLab}#receipt"`);
    expect(forStudent).toContain("Marked; your mark shows once it is released");
    expect(forStudent).not.toContain("Test assignedTa");
  });

  it("the desk opens the student a next-to-mark link names, on their page, and knows who is still to mark", async () => {
    const lab = (await loadMarkingLab(db, fixture.courseId, fixture.labId))!;
    const filters = { page: 1, pageSize: 1 };
    const whole = await loadMarkingDesk(db, { access: who("instructor"), lab, filters });
    // ownStudent's hand-in is fully marked; sameCohortStudent has handed nothing in: neither is to mark.
    expect(whole.toMarkIds).toEqual([]);
    const last = whole.matchingIds.at(-1)!;
    const opened = await loadMarkingDesk(db, { access: who("instructor"), lab, filters: { ...filters, studentId: last } });
    expect(opened.openId).toBe(last);
    expect(opened.page).toBe(whole.matchingIds.length);
    expect(opened.rows.map((row) => row.membershipId)).toEqual([last]);
    const recent = (await loadMarkingLab(db, fixture.courseId, recentLab))!;
    expect((await loadMarkingDesk(db, { access: who("instructor"), lab: recent, filters })).toMarkIds).toEqual([
      fixture.membershipIds.ownStudent,
    ]);
  });

  it("a TA's lists their cohorts' hand-ins still to mark, oldest first, and their progress per lab", async () => {
    const overview = await taOverview(db, who("assignedTa"));
    expect(overview.nextToMark).toEqual([
      {
        labId: recentLab,
        labTitle: "Viscosity of the fluid lot",
        membershipId: fixture.membershipIds.ownStudent,
        studentName: "Test ownStudent",
        version: 1,
        submittedAt: expect.any(String),
        reopened: false,
      },
    ]);
    // By due time; the draft lab is left out.
    expect(overview.progress).toEqual([
      { labId: expect.any(String), title: "Long past", handedIn: 0, toMark: 0, markedByYou: 0 },
      { labId: recentLab, title: "Viscosity of the fluid lot", handedIn: 1, toMark: 1, markedByYou: 0 },
      { labId: fixture.labId, title: "Drag on a steel sphere", handedIn: 1, toMark: 0, markedByYou: 1 },
    ]);
    const other = await taOverview(db, who("unassignedTa"));
    expect(other.nextToMark).toEqual([]);
    expect(other.progress.map((lab) => lab.title)).toEqual(["Viscosity of the fluid lot"]);
  });

  it("a student's gives their own due time, their extension, and where each lab stands", async () => {
    const own = await studentOverview(db, who("ownStudent"));
    expect(own.map(({ title, status, version, late }) => ({ title, status, version, late }))).toEqual([
      { title: "Long past", status: "not-handed-in", version: null, late: false },
      { title: "Viscosity of the fluid lot", status: "handed-in", version: 1, late: true },
      // Marked, not released: the student is told it is marked, not the mark.
      { title: "Drag on a steel sphere", status: "marked", version: 1, late: false },
    ]);
    const extended = await studentOverview(db, who("sameCohortStudent"));
    const recent = extended.find((lab) => lab.labId === recentLab)!;
    expect(recent).toMatchObject({ extended: true, status: "not-handed-in", lateCutoffAt: null });
    expect(new Date(recent.dueAt).getTime()).toBe(extensionDue.getTime());
    expect(Object.keys(recent)).not.toContain("reason");
    // Cohort two has only the lab set for both cohorts.
    expect((await studentOverview(db, who("otherCohortStudent"))).map((lab) => lab.title)).toEqual(["Viscosity of the fluid lot"]);
  });
});

describe("the overviews' statements", () => {
  /** A course of `size` students in one cohort with one TA, each with a hand-in of a published lab. */
  async function classOf(size: number) {
    const label = `overview-${size}`;
    const [course] = await db.insert(courses).values({ title: "Big class", code: label, term: "Test term", timeZone: "UTC" }).returning();
    const [cohort] = await db.insert(cohorts).values({ courseId: course.id, name: "All" }).returning();
    const [lab] = await db
      .insert(labs)
      .values({
        courseId: course.id,
        title: "Drag",
        kind: "drag",
        status: "published",
        opensAt: new Date(now.getTime() - day),
        dueAt: new Date(now.getTime() + day),
        resolutions,
      })
      .returning();
    await db.insert(labCohorts).values({ labId: lab.id, cohortId: cohort.id });
    const { membershipIds } = await seedMarkingClass(db, {
      courseId: course.id,
      labId: lab.id,
      cohortId: cohort.id,
      figures: Array.from({ length: size }, (_, index) => 1 + (index % 7) / 100),
      label,
    });
    const [staff, instructor] = await db
      .insert(users)
      .values([
        { email: `${label}-ta@overview.example`, name: "TA" },
        { email: `${label}-instructor@overview.example`, name: "Instructor" },
      ])
      .returning();
    const [ta, lead] = await db
      .insert(courseMemberships)
      .values([
        { courseId: course.id, userId: staff.id, role: "ta" },
        { courseId: course.id, userId: instructor.id, role: "instructor" },
      ])
      .returning();
    await db.insert(taCohortAssignments).values({ membershipId: ta.id, cohortId: cohort.id });
    const [student] = await db.select().from(courseMemberships).where(eq(courseMemberships.id, membershipIds[0]));
    return {
      instructor: accessOf(course.id, { userId: instructor.id, membershipId: lead.id, role: "instructor", cohortIds: [cohort.id] }),
      ta: accessOf(course.id, { userId: staff.id, membershipId: ta.id, role: "ta", cohortIds: [cohort.id] }),
      student: accessOf(course.id, { userId: student.userId, membershipId: student.id, role: "student", cohortIds: [cohort.id] }),
    };
  }

  it("are the same for 10 and for 1,000 students", async () => {
    const measure = async (size: number) => {
      const viewers = await classOf(size);
      const instructor = await countStatements(() => instructorOverview(db, viewers.instructor, now));
      const ta = await countStatements(() => taOverview(db, viewers.ta));
      const student = await countStatements(() => studentOverview(db, viewers.student));
      // The class is really there: every hand-in is waiting for the TA.
      expect(ta.result.progress[0].toMark).toBe(size);
      expect(instructor.result.deadlines[0].cohorts[0].handedIn).toBe(size);
      return { instructor: instructor.statements, ta: ta.statements, student: student.statements };
    };
    const small = await measure(10);
    const large = await measure(1000);
    expect(large).toEqual(small);
    // Headline counts (4), deadlines, TAs, class flags, part bias, overdue kits (2), failed e-mails, invitations.
    expect(small).toEqual({ instructor: 12, ta: 2, student: 1 });
  });
});
