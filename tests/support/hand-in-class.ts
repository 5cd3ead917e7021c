/**
 * A class about to hand in, written straight into the database in bulk statements: one course and
 * cohort, a published drag lab due in ten minutes, a kit at home for every student (a sphere and a
 * column of its own, the course's one fluid lot) and the course's instructor; then a session for each
 * of them, one insert each as sign-in makes them. For the hand-in benchmark and the scale test.
 */
import { randomUUID } from "node:crypto";
import { cohorts, courseMemberships, courses, kitParts, kits, labCohorts, labs, parts, users } from "~/db/schema";
import { SESSION_COOKIE, createSession } from "~/server/auth/session.server";
import { insertMany } from "~/server/bulk-insert.server";
import type { Database } from "~/server/db.server";

export type HandInStudent = { index: number; userId: string; membershipId: string; email: string; sphereId: string; cookie: string };

export type HandInClass = {
  courseId: string;
  labId: string;
  instructor: { userId: string; membershipId: string; cookie: string };
  students: HandInStudent[];
};

export async function seedHandInClass(db: Database, { students: count, label }: { students: number; label: string }): Promise<HandInClass> {
  const [course] = await db.insert(courses).values({ title: "Deadline rush", code: label, term: "Bench", timeZone: "UTC" }).returning();
  const [cohort] = await db.insert(cohorts).values({ courseId: course.id, name: "Everyone" }).returning();
  const [lab] = await db
    .insert(labs)
    .values({
      courseId: course.id,
      title: "Drag on a settling sphere",
      kind: "drag",
      status: "published",
      opensAt: new Date(Date.now() - 86_400_000),
      dueAt: new Date(Date.now() + 600_000),
      resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.5 },
      publishedAt: new Date(),
    })
    .returning();
  await db.insert(labCohorts).values({ labId: lab.id, cohortId: cohort.id });
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
  const people = Array.from({ length: count }, (_, index) => ({
    index,
    userId: randomUUID(),
    membershipId: randomUUID(),
    email: `student${index}@${label}.example`,
    kitId: randomUUID(),
    sphereId: randomUUID(),
    columnId: randomUUID(),
  }));
  const instructor = { userId: randomUUID(), membershipId: randomUUID() };
  await insertMany(db, users, [
    ...people.map((s) => ({ id: s.userId, email: s.email, name: `Student ${s.index}` })),
    { id: instructor.userId, email: `instructor@${label}.example`, name: "Course instructor" },
  ]);
  // Two inserts: every row of an insertMany must name the same columns.
  await insertMany(
    db,
    courseMemberships,
    people.map((s) => ({ id: s.membershipId, courseId: course.id, userId: s.userId, role: "student" as const, cohortId: cohort.id })),
  );
  await insertMany(db, courseMemberships, [
    { id: instructor.membershipId, courseId: course.id, userId: instructor.userId, role: "instructor" as const },
  ]);
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
  const cookieFor = async (userId: string) => {
    const { token } = await createSession(db, userId, new Request("http://127.0.0.1/"));
    return `${SESSION_COOKIE}=${token}`;
  };
  const students: HandInStudent[] = [];
  for (const { index, userId, membershipId, email, sphereId } of people)
    students.push({ index, userId, membershipId, email, sphereId, cookie: await cookieFor(userId) });
  return { courseId: course.id, labId: lab.id, instructor: { ...instructor, cookie: await cookieFor(instructor.userId) }, students };
}

/** A student's ten timed drops, a little different for each student, in seconds. */
export function dropTimes(index: number): number[] {
  return Array.from({ length: 10 }, (_, drop) => Number((7.45 + (((index * 7 + drop * 3) % 11) - 5) * 0.01).toFixed(2)));
}
