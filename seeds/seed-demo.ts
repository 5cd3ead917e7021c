/**
 * Writes the demo scenario into a database once. Idempotent: when the demo course is already there,
 * nothing is touched, so a second `npm start` keeps every change made through the app.
 */
import { Faker, en } from "@faker-js/faker";
import { and, eq } from "drizzle-orm";
import { cohorts, courseMemberships, courses, taCohortAssignments, users } from "~/db/schema";
import { hashPassword } from "~/server/auth/password.server";
import { createDatabase, createPool, type Database } from "~/server/db.server";
import { environment } from "~/server/env.server";
import { migrateDatabase } from "~/server/migrate.server";
import { developmentDatabaseUrl } from "../scripts/lib/database-url";
import { ensureDatabases } from "../scripts/lib/postgres";
import { DEMO_PASSWORD, buildDemoScenario, demoCohortNames, demoCourse } from "./demo-scenario";
import { seedExtensions } from "./seed-extensions";
import { seedKits } from "./seed-kits";
import { seedLabs } from "./seed-labs";
import { seedMarkBook } from "./seed-mark-book";
import { seedLastTerm } from "./seed-last-term";
import { seedMarking } from "./seed-marking";
import { seedMessages } from "./seed-messages";
import { seedRevisions } from "./seed-revisions";
import { seedShipping } from "./seed-shipping";

export async function seedDemo(db: Database): Promise<"seeded" | "already there"> {
  // Its accounts share a password printed in the README: a production process never writes them.
  if (environment().NODE_ENV === "production") throw new Error("The demo scenario is never seeded in production.");
  const existing = await db
    .select({ id: courses.id })
    .from(courses)
    .where(and(eq(courses.code, demoCourse.code), eq(courses.term, demoCourse.term)));
  if (existing.length > 0) return "already there";

  const scenario = buildDemoScenario();
  // One hash for everyone: argon2id is slow by design, and the demo password is public anyway.
  const passwordHash = await hashPassword(DEMO_PASSWORD);

  const { courseId, instructorId } = await db.transaction(async (tx) => {
    const [course] = await tx.insert(courses).values(demoCourse).returning();
    const cohortRows = await tx
      .insert(cohorts)
      .values(demoCohortNames.map((name, position) => ({ courseId: course.id, name, position })))
      .returning();
    const cohortIdAt = (index: number) => cohortRows.find((row) => row.name === demoCohortNames[index])!.id;

    const people = [scenario.instructor, ...scenario.tas, ...scenario.students];
    const userRows = await tx
      .insert(users)
      .values(
        people.map((p) => ({
          name: p.name,
          email: p.email,
          studentNumber: p.studentNumber ?? null,
          passwordHash,
          mayCreateCourses: p === scenario.instructor,
        })),
      )
      .onConflictDoNothing()
      .returning();
    const userIdOf = (email: string) => userRows.find((row) => row.email === email)!.id;

    const memberships = await tx
      .insert(courseMemberships)
      .values([
        { courseId: course.id, userId: userIdOf(scenario.instructor.email), role: "instructor" as const },
        ...scenario.tas.map((ta) => ({ courseId: course.id, userId: userIdOf(ta.email), role: "ta" as const })),
        ...scenario.students.map((student) => ({
          courseId: course.id,
          userId: userIdOf(student.email),
          role: "student" as const,
          cohortId: cohortIdAt(student.cohort),
        })),
      ])
      .returning();
    const membershipOf = (email: string) => memberships.find((row) => row.userId === userIdOf(email))!.id;

    await tx
      .insert(taCohortAssignments)
      .values(
        scenario.tas.flatMap((ta) => ta.cohorts.map((cohort) => ({ membershipId: membershipOf(ta.email), cohortId: cohortIdAt(cohort) }))),
      );

    // Its own seeded generator, so that growing the kit inventory never changes who the people are.
    const kitFaker = new Faker({ locale: [en] });
    kitFaker.seed(2141);
    await seedKits(tx, kitFaker, {
      courseId: course.id,
      instructorId: userIdOf(scenario.instructor.email),
      studentMembershipIds: scenario.students.map((student) => membershipOf(student.email)),
    });
    return { courseId: course.id, instructorId: userIdOf(scenario.instructor.email) };
  });
  const shippingFaker = new Faker({ locale: [en] });
  shippingFaker.seed(2144);
  await seedShipping(db, shippingFaker, { courseId, instructorId });
  // After the people and kits are committed: hand-ins go through the server's own hand-in path.
  const labFaker = new Faker({ locale: [en] });
  labFaker.seed(2142);
  await seedLabs(db, labFaker, { courseId });
  await seedExtensions(db, { courseId });
  const markingFaker = new Faker({ locale: [en] });
  markingFaker.seed(2143);
  await seedMarking(db, markingFaker, { courseId });
  await seedRevisions(db, { courseId });
  await seedMarkBook(db, { courseId });
  await seedLastTerm(db, { courseId, instructorId });
  await seedMessages(db, { courseId });
  return "seeded";
}

/** Brings up the development database, migrates it and adds the demo scenario when it is missing. */
export async function prepareDevelopmentDatabase(): Promise<"seeded" | "already there"> {
  await ensureDatabases();
  await migrateDatabase(developmentDatabaseUrl());
  const pool = createPool();
  try {
    return await seedDemo(createDatabase(pool));
  } finally {
    await pool.end();
  }
}
