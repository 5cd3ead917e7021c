/**
 * A student's marking view on a real PostgreSQL, through the app's own request handler: who may open
 * whose view (a TA only their cohorts' students), its place in the desk's order, and the same number
 * of SQL statements for a class of 10 and of 400.
 */
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, cohorts, labCohorts, labs, taCohortAssignments } from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { loadMarkingDesk } from "~/server/marking/marking-desk.server";
import { loadMarkingStudent, orderAround } from "~/server/marking/marking-student.server";
import { saveRubric } from "~/server/marking/rubrics.server";
import { createAccessFixture, type AccessFixture } from "../support/access-fixture";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { quietClass } from "../support/comparison-class";
import { countStatements } from "../support/count-statements";
import { seedMarkingClass } from "../support/marking-class";

let fixture: AccessFixture;
let handle: AppHandler;
const day = 24 * 3600 * 1000;

/** A published drag lab with a small rubric, for the given cohorts. */
async function labFor(title: string, cohortIds: string[]) {
  const [lab] = await db
    .insert(labs)
    .values({
      courseId: fixture.courseId,
      title,
      kind: "drag",
      status: "published",
      opensAt: new Date(Date.now() - day),
      dueAt: new Date(Date.now() + day),
      requiredDrops: 10,
      resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
    })
    .returning();
  await db.insert(labCohorts).values(cohortIds.map((cohortId) => ({ labId: lab.id, cohortId })));
  const instructor = {
    user: { id: fixture.userIds.instructor, email: "instructor@ms.example", name: "Test instructor", sessionId: null, via: "session" },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "ms-A", term: "Test term", timeZone: "UTC" },
    membership: { id: fixture.membershipIds.instructor, role: "instructor", cohortId: null },
    cohortIds: [fixture.cohortId, fixture.otherCohortId, ...cohortIds],
  } as unknown as CourseAccess;
  await saveRubric(db, {
    access: instructor,
    lab: (await loadMarkingLab(db, fixture.courseId, lab.id))!,
    input: {
      criteria: [
        {
          kind: "levels",
          title: "Set-up described",
          levels: [
            { points: 0, description: "Not described" },
            { points: 2, description: "Fully" },
          ],
        },
        { kind: "range", title: "Discussion", minPoints: 0, maxPoints: 3 },
      ],
    },
  });
  return lab;
}

const taAccess = (cohortIds: string[]) =>
  ({
    user: { id: fixture.userIds.assignedTa, email: "assignedta@ms.example", name: "Test assignedTa", sessionId: null, via: "session" },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "ms-A", term: "Test term", timeZone: "UTC" },
    membership: { id: fixture.membershipIds.assignedTa, role: "ta", cohortId: null },
    cohortIds,
  }) as unknown as CourseAccess;

/** A cohort of its own for one test, marked by `assignedTa`. */
async function taCohort(name: string) {
  const [cohort] = await db.insert(cohorts).values({ courseId: fixture.courseId, name }).returning();
  await db.insert(taCohortAssignments).values({ membershipId: fixture.membershipIds.assignedTa, cohortId: cohort.id });
  return cohort.id;
}

const viewPath = (labId: string, membershipId: string, search = "") =>
  `/courses/${fixture.courseId}/labs/${labId}/marking/students/${membershipId}.data${search}`;

beforeAll(async () => {
  fixture = await createAccessFixture("ms");
  handle = await createAppHandler();
});

describe("a student's marking view", () => {
  it("opens for a TA on their cohorts' students only: another cohort's student is refused and the refusal kept", async () => {
    const lab = await labFor("Marking view scope", [fixture.cohortId, fixture.otherCohortId]);
    const cookie = await sessionCookieFor(fixture.userIds.assignedTa);
    const status = async (membershipId: string) => (await handle(appRequest(viewPath(lab.id, membershipId), { cookie }))).status;
    expect(await status(fixture.membershipIds.ownStudent)).toBe(200);
    expect(await status(fixture.membershipIds.otherCohortStudent)).toBe(403);
    const refusals = await db
      .select({ subject: auditEvents.subject })
      .from(auditEvents)
      .where(and(eq(auditEvents.action, "access.denied"), eq(auditEvents.actorId, fixture.userIds.assignedTa)));
    expect(refusals.length).toBeGreaterThan(0);
    // Not a student, and no such member: nothing to mark.
    expect(await status(fixture.membershipIds.assignedTa)).toBe(404);
    expect(await status("8d1f5a8e-0000-4000-8000-000000000000")).toBe(404);
    expect(await status("not-an-id")).toBe(404);
    // The instructor opens the other cohort's student.
    const instructor = await sessionCookieFor(fixture.userIds.instructor);
    const response = await handle(appRequest(viewPath(lab.id, fixture.membershipIds.otherCohortStudent), { cookie: instructor }));
    expect(response.status).toBe(200);
  });

  it("reads the same number of SQL statements for 10 and for 400 students, with the student's place in the desk's order", async () => {
    const statementsFor = async (size: number) => {
      const cohortId = await taCohort(`View size ${size}`);
      const lab = await labFor(`View size ${size}`, [cohortId]);
      const { membershipIds } = await seedMarkingClass(db, {
        courseId: fixture.courseId,
        labId: lab.id,
        cohortId,
        figures: quietClass(size),
        label: `view${size}`,
      });
      const cookie = await sessionCookieFor(fixture.userIds.assignedTa);
      const markingLab = (await loadMarkingLab(db, fixture.courseId, lab.id))!;
      // The desk's own order of the whole class, which the view's neighbours follow.
      const { matchingIds } = await loadMarkingDesk(db, {
        access: taAccess([cohortId]),
        lab: markingLab,
        filters: { page: 1, pageSize: 1 },
      });
      const chosen = membershipIds[2];
      const place = matchingIds.indexOf(chosen);
      const { statements, result } = await countStatements(() => handle(appRequest(viewPath(lab.id, chosen), { cookie })));
      expect(result.status).toBe(200);
      expect(await result.text()).toContain(`view${size} student 0002`);
      const view = await loadMarkingStudent(db, {
        access: taAccess([cohortId]),
        lab: markingLab,
        membershipId: chosen,
        filters: { page: 1, pageSize: 50 },
      });
      expect(view?.row.studentName).toBe(`view${size} student 0002`);
      expect(view?.order).toMatchObject({
        index: place,
        count: size,
        previousId: matchingIds[place - 1] ?? null,
        nextId: matchingIds[place + 1] ?? null,
      });
      return statements;
    };
    const small = await statementsFor(10);
    expect(await statementsFor(400)).toBe(small);
  });
});

describe("the order around a student", () => {
  const ids = ["a", "b", "c", "d", "e"];
  it("names the neighbours and the next still to mark after the student, wrapping round, never the student", () => {
    expect(orderAround(ids, ["a", "c", "e"], "c")).toEqual({ index: 2, count: 5, previousId: "b", nextId: "d", nextToMarkId: "e" });
    expect(orderAround(ids, ["a", "e"], "e")).toEqual({ index: 4, count: 5, previousId: "d", nextId: null, nextToMarkId: "a" });
    expect(orderAround(ids, ["b"], "b").nextToMarkId).toBeNull();
    expect(orderAround(ids, [], "a")).toMatchObject({ previousId: null, nextId: "b", nextToMarkId: null });
  });
});
