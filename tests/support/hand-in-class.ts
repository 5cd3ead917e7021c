/**
 * A class about to hand in, written straight into the database in bulk statements, for the hand-in
 * and load benchmarks and the scale test: see `seedHandInClass`.
 */
import { randomUUID } from "node:crypto";
import {
  cohorts as cohortsTable,
  courseMemberships,
  courses,
  kitParts,
  kits,
  labCohorts,
  labs as labsTable,
  parts,
  taCohortAssignments,
  users,
} from "~/db/schema";
import { SESSION_COOKIE, createSession } from "~/server/auth/session.server";
import { insertMany } from "~/server/bulk-insert.server";
import type { Database } from "~/server/db.server";

export type HandInStudent = {
  index: number;
  userId: string;
  membershipId: string;
  cohortId: string;
  kitId: string;
  email: string;
  sphereId: string;
  columnId: string;
  /** The Cookie header of the student's session. */
  cookie: string;
};
export type HandInStaff = { userId: string; membershipId: string; cookie: string };

/**
 * The class of a deadline rush, in a constant number of bulk statements: one course, `students`
 * students spread over `cohorts` cohorts, each with a kit at home (their own sphere and column, the
 * shared glycerol lot) and a session, one insert each as sign-in makes them; `labs` published drag
 * labs open to every cohort and due in `dueInMs`; an instructor and a TA of every cohort, signed in too.
 */
export async function seedHandInClass(
  db: Database,
  {
    students: studentCount,
    label,
    cohorts: cohortCount = 1,
    labs: labCount = 1,
    dueInMs = 600_000,
  }: { students: number; label: string; cohorts?: number; labs?: number; dueInMs?: number },
) {
  const signIn = async (userId: string) => {
    const { token } = await createSession(db, userId, new Request("http://127.0.0.1/"));
    return `${SESSION_COOKIE}=${token}`;
  };

  const [course] = await db.insert(courses).values({ title: "Deadline rush", code: label, term: "Bench", timeZone: "UTC" }).returning();
  const cohorts = await db
    .insert(cohortsTable)
    .values(
      Array.from({ length: cohortCount }, (_, index) => ({
        courseId: course.id,
        name: cohortCount === 1 ? "Everyone" : `Bench ${index + 1}`,
      })),
    )
    .returning();
  const labs = await db
    .insert(labsTable)
    .values(
      Array.from({ length: labCount }, (_, index) => ({
        courseId: course.id,
        title: labCount === 1 ? "Drag on a settling sphere" : `Drag on a settling sphere ${index + 1}`,
        kind: "drag" as const,
        status: "published" as const,
        opensAt: new Date(Date.now() - 86_400_000),
        dueAt: new Date(Date.now() + dueInMs),
        resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.5 },
        publishedAt: new Date(),
      })),
    )
    .returning();
  await db.insert(labCohorts).values(labs.flatMap((lab) => cohorts.map((cohort) => ({ labId: lab.id, cohortId: cohort.id }))));
  const [fluidLot] = await db
    .insert(parts)
    .values({
      courseId: course.id,
      kind: "fluid_lot",
      label: "GLY-B",
      fluidName: "glycerol",
      densityKgM3: 1260,
      calibration: [
        { temperatureC: 20, viscosityPaS: 1.41 },
        { temperatureC: 25, viscosityPaS: 0.94 },
      ],
    })
    .returning();
  const people = Array.from({ length: studentCount }, (_, index) => ({
    index,
    userId: randomUUID(),
    membershipId: randomUUID(),
    email: `student${index}@${label}.example`,
    cohortId: cohorts[index % cohortCount].id,
    kitId: randomUUID(),
    sphereId: randomUUID(),
    columnId: randomUUID(),
  }));
  const instructorIds = { userId: randomUUID(), membershipId: randomUUID() };
  const taIds = { userId: randomUUID(), membershipId: randomUUID() };
  await insertMany(db, users, [
    ...people.map((s) => ({ id: s.userId, email: s.email, name: `Student ${s.index}` })),
    { id: instructorIds.userId, email: `instructor@${label}.example`, name: "Bench instructor" },
    { id: taIds.userId, email: `ta@${label}.example`, name: "Bench TA" },
  ]);
  await insertMany(db, courseMemberships, [
    ...people.map((s) => ({ id: s.membershipId, courseId: course.id, userId: s.userId, role: "student" as const, cohortId: s.cohortId })),
    { id: instructorIds.membershipId, courseId: course.id, userId: instructorIds.userId, role: "instructor" as const, cohortId: null },
    { id: taIds.membershipId, courseId: course.id, userId: taIds.userId, role: "ta" as const, cohortId: null },
  ]);
  await db.insert(taCohortAssignments).values(cohorts.map((cohort) => ({ membershipId: taIds.membershipId, cohortId: cohort.id })));
  // Two inserts: every row of an insertMany must name the same columns.
  await insertMany(
    db,
    parts,
    people.map((s) => ({
      id: s.sphereId,
      courseId: course.id,
      kind: "sphere" as const,
      label: `S-${s.index}`,
      material: "steel",
      diameterMm: 3,
      massG: 0.11,
    })),
  );
  await insertMany(
    db,
    parts,
    people.map((s) => ({
      id: s.columnId,
      courseId: course.id,
      kind: "column" as const,
      label: `C-${s.index}`,
      innerDiameterMm: 40,
      timedDistanceMm: 200,
      runInMm: 100,
    })),
  );
  await insertMany(
    db,
    kits,
    people.map((s) => ({
      id: s.kitId,
      courseId: course.id,
      number: `K-${s.index}`,
      state: "at_home" as const,
      holderMembershipId: s.membershipId,
    })),
  );
  await insertMany(db, kitParts, [
    ...people.flatMap((s) => [
      { kitId: s.kitId, partId: s.sphereId, exclusive: true },
      { kitId: s.kitId, partId: s.columnId, exclusive: true },
    ]),
    ...people.map((s) => ({ kitId: s.kitId, partId: fluidLot.id, exclusive: false })),
  ]);
  const students: HandInStudent[] = [];
  for (const person of people) students.push({ ...person, cookie: await signIn(person.userId) });
  const instructor: HandInStaff = { ...instructorIds, cookie: await signIn(instructorIds.userId) };
  const ta: HandInStaff = { ...taIds, cookie: await signIn(taIds.userId) };
  return { label, course, courseId: course.id, cohorts, labs, labId: labs[0].id, students, instructor, ta };
}

export type HandInClass = Awaited<ReturnType<typeof seedHandInClass>>;
