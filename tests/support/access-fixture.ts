/**
 * The cast of the authorization matrix, written straight into the test file's database: two courses,
 * two cohorts in the first, and one person for every kind of access the matrix checks.
 */
import { cohorts, courseMemberships, courses, kits, parts, taCohortAssignments, users } from "~/db/schema";
import { db } from "~/server/db.server";

export const actors = [
  "anonymous",
  "ownStudent",
  "sameCohortStudent",
  "otherCohortStudent",
  "assignedTa",
  "unassignedTa",
  "instructor",
  "otherInstructor",
] as const;
export type Actor = (typeof actors)[number];

export type AccessFixture = {
  courseId: string;
  otherCourseId: string;
  cohortId: string;
  otherCohortId: string;
  userIds: Record<Exclude<Actor, "anonymous">, string>;
  membershipIds: Record<Exclude<Actor, "anonymous" | "otherInstructor">, string>;
  /** A kit held by `ownStudent`, and a part of the course. */
  kitId: string;
  partId: string;
};

export async function createAccessFixture(label = "matrix"): Promise<AccessFixture> {
  const [course, otherCourse] = await db
    .insert(courses)
    .values([
      { title: "Settling Spheres", code: `${label}-A`, term: "Test term", timeZone: "UTC" },
      { title: "Another Course", code: `${label}-B`, term: "Test term", timeZone: "UTC" },
    ])
    .returning();
  const [cohort, otherCohort] = await db
    .insert(cohorts)
    .values([
      { courseId: course.id, name: "Cohort one" },
      { courseId: course.id, name: "Cohort two" },
    ])
    .returning();
  const people = ["ownStudent", "sameCohortStudent", "otherCohortStudent", "assignedTa", "unassignedTa", "instructor", "otherInstructor"] as const;
  const userRows = await db
    .insert(users)
    .values(
      people.map((actor) => ({
        email: `${actor.toLowerCase()}@${label}.example`,
        name: `Test ${actor}`,
        mayCreateCourses: actor === "instructor" || actor === "otherInstructor",
      })),
    )
    .returning({ id: users.id, email: users.email });
  const userIds = Object.fromEntries(people.map((actor, index) => [actor, userRows[index].id])) as AccessFixture["userIds"];
  const memberships = [
    { actor: "ownStudent", courseId: course.id, role: "student", cohortId: cohort.id },
    { actor: "sameCohortStudent", courseId: course.id, role: "student", cohortId: cohort.id },
    { actor: "otherCohortStudent", courseId: course.id, role: "student", cohortId: otherCohort.id },
    { actor: "assignedTa", courseId: course.id, role: "ta", cohortId: null },
    { actor: "unassignedTa", courseId: course.id, role: "ta", cohortId: null },
    { actor: "instructor", courseId: course.id, role: "instructor", cohortId: null },
    { actor: "otherInstructor", courseId: otherCourse.id, role: "instructor", cohortId: null },
  ] as const;
  const membershipRows = await db
    .insert(courseMemberships)
    .values(memberships.map(({ actor, ...membership }) => ({ ...membership, userId: userIds[actor] })))
    .returning({ id: courseMemberships.id });
  const membershipIds = Object.fromEntries(memberships.map((membership, index) => [membership.actor, membershipRows[index].id]));
  await db.insert(taCohortAssignments).values([
    { membershipId: membershipIds.assignedTa, cohortId: cohort.id },
    // Assigned too, but to the other cohort: "not assigned" to the objects of cohort one.
    { membershipId: membershipIds.unassignedTa, cohortId: otherCohort.id },
  ]);
  const [part] = await db.insert(parts).values({ courseId: course.id, kind: "accessory", label: "MAG-1", accessoryType: "retrieval magnet" }).returning();
  const [kit] = await db.insert(kits).values({ courseId: course.id, number: "K-01", state: "at_home", holderMembershipId: membershipIds.ownStudent }).returning();
  return {
    courseId: course.id,
    otherCourseId: otherCourse.id,
    cohortId: cohort.id,
    otherCohortId: otherCohort.id,
    userIds,
    membershipIds: membershipIds as AccessFixture["membershipIds"],
    kitId: kit.id,
    partId: part.id,
  };
}
