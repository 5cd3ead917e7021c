/**
 * The cast of the authorization matrix, written straight into the test file's database: two courses,
 * two cohorts in the first, and one person for every kind of access the matrix checks.
 */
import {
  cohorts,
  courseMemberships,
  courses,
  dropLogPhotos,
  kitParts,
  kits,
  labCohorts,
  labs,
  parts,
  shipmentItems,
  shipments,
  taCohortAssignments,
  users,
} from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { ensureDropLog, handInDropLog } from "~/server/drop-logs/hand-in.server";
import { storePhoto } from "~/server/drop-logs/photos.server";

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
  /** A published lab for cohort one, open now; `ownStudent`'s kit holds a sphere, column and fluid lot for it. */
  labId: string;
  sphereId: string;
  /** `ownStudent`'s drop log of that lab, with one version and one photo. */
  dropLogId: string;
  photoId: string;
  /** An outbound shipment of `ownStudent`'s kit, its label not bought yet. */
  shipmentId: string;
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
  const people = [
    "ownStudent",
    "sameCohortStudent",
    "otherCohortStudent",
    "assignedTa",
    "unassignedTa",
    "instructor",
    "otherInstructor",
  ] as const;
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
  const [part] = await db
    .insert(parts)
    .values({ courseId: course.id, kind: "accessory", label: "MAG-1", accessoryType: "retrieval magnet" })
    .returning();
  const [kit] = await db
    .insert(kits)
    .values({ courseId: course.id, number: "K-01", state: "at_home", holderMembershipId: membershipIds.ownStudent })
    .returning();
  const [sphere, column, fluidLot] = await db
    .insert(parts)
    .values([
      { courseId: course.id, kind: "sphere", label: "S-1", material: "steel", diameterMm: 3, massG: 0.11 },
      { courseId: course.id, kind: "column", label: "C-1", innerDiameterMm: 40, timedDistanceMm: 200, runInMm: 100 },
      {
        courseId: course.id,
        kind: "fluid_lot",
        label: "F-1",
        fluidName: "glycerol",
        densityKgM3: 1260,
        calibration: [
          { temperatureC: 20, viscosityPaS: 1.41 },
          { temperatureC: 25, viscosityPaS: 0.94 },
        ],
      },
    ])
    .returning();
  await db.insert(kitParts).values([
    { kitId: kit.id, partId: sphere.id },
    { kitId: kit.id, partId: column.id },
    { kitId: kit.id, partId: fluidLot.id, exclusive: false },
  ]);
  const day = 24 * 3600 * 1000;
  const [lab] = await db
    .insert(labs)
    .values({
      courseId: course.id,
      title: "Drag on a steel sphere",
      kind: "drag",
      status: "published",
      opensAt: new Date(Date.now() - day),
      dueAt: new Date(Date.now() + 7 * day),
      resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
      publishedAt: new Date(),
    })
    .returning();
  await db.insert(labCohorts).values({ labId: lab.id, cohortId: cohort.id });
  // ownStudent's drop log goes through the real hand-in, so its version is what the app stores.
  const dropLogId = await ensureDropLog(db, { labId: lab.id, membershipId: membershipIds.ownStudent });
  const storageKey = `${dropLogId}/fixture`;
  // The PNG signature is all the download route needs; the bytes are never decoded.
  await storePhoto(
    storageKey,
    new File([new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])], "set-up.png", { type: "image/png" }),
  );
  const [photo] = await db.insert(dropLogPhotos).values({ dropLogId, storageKey, contentType: "image/png", bytes: 8 }).returning();
  const ownStudentAccess = {
    user: { id: userIds.ownStudent, email: `ownstudent@${label}.example`, name: "Test ownStudent", sessionId: null, via: "session" },
    course: { id: course.id, title: course.title, code: course.code, term: course.term, timeZone: course.timeZone },
    membership: { id: membershipIds.ownStudent, role: "student", cohortId: cohort.id },
    cohortIds: [cohort.id],
  } as unknown as CourseAccess;
  await handInDropLog(db, {
    access: ownStudentAccess,
    labId: lab.id,
    idempotencyKey: `${label}-fixture-hand-in`,
    input: { sphereId: sphere.id, temperatureC: 22, drops: [7.41, 7.52, 7.47, 7.38, 7.5] },
  });
  const [shipment] = await db
    .insert(shipments)
    .values({ courseId: course.id, kind: "outbound", requestKey: `${label}-fixture-shipment`, createdById: userIds.instructor })
    .returning();
  await db.insert(shipmentItems).values({ shipmentId: shipment.id, kitId: kit.id });
  return {
    courseId: course.id,
    otherCourseId: otherCourse.id,
    cohortId: cohort.id,
    otherCohortId: otherCohort.id,
    userIds,
    membershipIds: membershipIds as AccessFixture["membershipIds"],
    kitId: kit.id,
    partId: part.id,
    labId: lab.id,
    sphereId: sphere.id,
    dropLogId,
    photoId: photo.id,
    shipmentId: shipment.id,
  };
}
