/**
 * The demo labs and their drop logs. Timings come from the "real world" of demo-physics.ts (the
 * standard drag curve, Di Felice's wall factor, a thermometer good to ±0.5 K, hand timing), not from the
 * model the server reduces with, so the class's figures scatter by a few per cent as a real class's do.
 * A few are deliberately wrong, and the glycerol lot's record is off: the fluid in the bottles is 20 %
 * more viscous than its calibration says (as if mixed with less water than recorded), so the kit-part
 * check flags GLY-95A until seed-revisions.ts corrects its record. Invented demo data: never a test's
 * expected value.
 */
import type { Faker } from "@faker-js/faker";
import { eq } from "drizzle-orm";
import { cohorts, courseMemberships, courses, kitParts, kits, labCohorts, labs, parts, users } from "~/db/schema";
import type { DropLogInput } from "~/lib/drop-logs/drop-log-input";
import { kitStatesBeforeHome } from "~/lib/kits/kit-states";
import { fitFluidViscosity, viscosityAt } from "~/lib/reduction";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Database } from "~/server/db.server";
import { handInDropLog } from "~/server/drop-logs/hand-in.server";
import { scheduleLabReminders } from "~/server/labs/lab-reminders.server";
import { settlingVelocity, stopwatch, thermometerReading } from "./demo-physics";
import { DEMO_TERM_OPENED_DAYS_AGO } from "./demo-scenario";

const DAY_MS = 86_400_000;
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.5 };
/** How much more viscous each lot really is than its recorded calibration. */
const trueViscosityFactor: Record<string, number> = { "GLY-95A": 1.2, "SYR-2B": 1 };

type Mistake = "none" | "stopwatch-slip" | "warm-fluid" | "wrong-sphere" | "misread-diameter";

export async function seedLabs(db: Database, faker: Faker, { courseId }: { courseId: string }): Promise<void> {
  const now = Date.now();
  const courseParts = await db.select().from(parts).where(eq(parts.courseId, courseId));
  const glycerol = courseParts.find((part) => part.label === "GLY-95A")!;
  const syrup = courseParts.find((part) => part.label === "SYR-2B")!;
  const cohortRows = await db.select({ id: cohorts.id }).from(cohorts).where(eq(cohorts.courseId, courseId));
  // Every kit holds both lots; each lab names its own, so a hand-in is reduced against the right bottle.
  const glassSpheres = courseParts.filter((part) => part.kind === "sphere" && part.label.startsWith("G6")).map((part) => part.id);

  const [dragLab, viscometryLab] = await db
    .insert(labs)
    .values([
      {
        courseId,
        title: "Drag on a settling sphere",
        kind: "drag" as const,
        status: "published" as const,
        instructions: "Drop the 3 mm steel sphere ten times through the glycerol–water column and time it between the bands.",
        opensAt: new Date(now - DEMO_TERM_OPENED_DAYS_AGO * DAY_MS),
        dueAt: new Date(now - 2 * DAY_MS),
        lateCutoffAt: new Date(now + 5 * DAY_MS),
        // Any sphere and column of the kit; the glycerol lot only.
        allowedPartIds: [glycerol.id],
        resolutions,
        publishedAt: new Date(now - 16 * DAY_MS),
      },
      {
        courseId,
        title: "Falling-ball viscometry of glucose syrup",
        kind: "viscometry" as const,
        status: "published" as const,
        instructions: "Drop the 6 mm glass sphere ten times through the syrup and time it between the bands.",
        opensAt: new Date(now - 3 * DAY_MS),
        dueAt: new Date(now + 5 * DAY_MS),
        lateCutoffAt: new Date(now + 8 * DAY_MS),
        // The glass spheres and the syrup lot; any column of the kit.
        allowedPartIds: [...glassSpheres, syrup.id],
        resolutions,
        publishedAt: new Date(now - 3 * DAY_MS),
      },
    ])
    .returning();
  await db
    .insert(labCohorts)
    .values([dragLab, viscometryLab].flatMap((lab) => cohortRows.map((cohort) => ({ labId: lab.id, cohortId: cohort.id }))));
  // As publishing does: the viscometry lab's 48 h and 6 h reminders wait in the queue (the drag lab's are past).
  await db.transaction(async (tx) => {
    for (const lab of [dragLab, viscometryLab]) await scheduleLabReminders(tx, lab, new Date(now));
  });

  // Students who hold a kit, with the parts of it, in one statement.
  const holders = await db
    .select({
      membershipId: courseMemberships.id,
      cohortId: courseMemberships.cohortId,
      userId: users.id,
      email: users.email,
      name: users.name,
      kitState: kits.state,
      part: parts,
    })
    .from(kits)
    .innerJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .innerJoin(kitParts, eq(kitParts.kitId, kits.id))
    .innerJoin(parts, eq(parts.id, kitParts.partId))
    .where(eq(kits.courseId, courseId));
  const byStudent = new Map<string, typeof holders>();
  for (const row of holders) byStudent.set(row.membershipId, [...(byStudent.get(row.membershipId) ?? []), row]);

  const [course] = await db.select().from(courses).where(eq(courses.id, courseId));
  const students = [...byStudent.values()];
  // Students whose kit has not reached them yet hand nothing in, but for one, who hands in the open lab
  // anyway (a borrowed kit): that hand-in carries the kit-not-at-home warning staff see.
  let earlyHandInTaken = false;
  for (const [index, rows] of students.entries()) {
    const { membershipId, cohortId, userId, email, name, kitState } = rows[0];
    const kitAway = kitStatesBeforeHome.includes(kitState);
    const earlyHandIn = kitAway && !earlyHandInTaken;
    if (earlyHandIn) earlyHandInTaken = true;
    const access: CourseAccess = {
      user: { id: userId, email, name, mayCreateCourses: false, sessionId: null, via: "session" },
      course: { id: courseId, title: course.title, code: course.code, term: course.term, timeZone: course.timeZone, archivedAt: null },
      membership: { id: membershipId, role: "student", cohortId },
      cohortIds: cohortId ? [cohortId] : [],
    };
    const column = rows.find((row) => row.part.kind === "column")!.part;
    const sphereOf = (prefix: string) => rows.find((row) => row.part.label.startsWith(prefix))!.part;
    const mistake: Mistake =
      index === 3
        ? "stopwatch-slip"
        : index === 7
          ? "warm-fluid"
          : index === 11
            ? "wrong-sphere"
            : index === 15
              ? "misread-diameter"
              : "none";

    const timeDrop = stopwatch(faker);
    /** Ten hand-timed drops of `sphere` through `lot` at the fluid's true temperature. */
    const dropsFor = (sphere: typeof column, lot: typeof column, trueTemperatureC: number) => {
      const diameterM = sphere.diameterMm! / 1000;
      const calibration = fitFluidViscosity(lot.calibration!.map((p) => ({ temperature: p.temperatureC, viscosity: p.viscosityPaS })));
      const velocity = settlingVelocity({
        diameterM,
        sphereDensityKgM3: (6 * (sphere.massG! / 1000)) / (Math.PI * diameterM ** 3),
        fluidDensityKgM3: lot.densityKgM3!,
        viscosityPaS: viscosityAt(calibration, trueTemperatureC) * trueViscosityFactor[lot.label],
        columnDiameterM: column.innerDiameterMm! / 1000,
      });
      return Array.from({ length: 10 }, () => timeDrop(column.timedDistanceMm! / 1000 / velocity));
    };

    // Most of the class handed the drag lab in before its due time; a few are late; a few never did.
    if (index % 9 !== 8 && !kitAway) {
      const roomC = faker.number.float({ min: 19, max: 23 });
      const temperatureC = thermometerReading(faker, roomC, resolutions.temperatureC);
      const timedSphere = mistake === "wrong-sphere" ? sphereOf("S4") : sphereOf("S3");
      const drops = dropsFor(timedSphere, glycerol, mistake === "warm-fluid" ? roomC + 6 : roomC);
      if (mistake === "stopwatch-slip") drops[4] = Number((drops[4] * 2).toFixed(2));
      const input: DropLogInput = {
        sphereId: sphereOf("S3").id,
        fluidLotId: glycerol.id,
        temperatureC,
        drops,
        notes: mistake === "warm-fluid" ? "Fluid felt warm from the radiator." : undefined,
      };
      // A micrometer read half a turn off (0.5 mm): the kit's record is used, and the log carries a warning.
      if (mistake === "misread-diameter") input.ownDiameterMm = Number((sphereOf("S3").diameterMm! + 0.5).toFixed(2));
      const late = index % 6 === 5;
      await handInDropLog(db, {
        access,
        labId: dragLab.id,
        input,
        idempotencyKey: `demo-drag-${membershipId}`,
        now: new Date(now - (late ? 1 : 3) * DAY_MS),
      });
    }
    // The viscometry lab is still open: about half have handed in.
    if ((index % 2 === 0 && !kitAway) || earlyHandIn) {
      const roomC = faker.number.float({ min: 18, max: 22 });
      const temperatureC = thermometerReading(faker, roomC, resolutions.temperatureC);
      const input: DropLogInput = {
        sphereId: sphereOf("G6").id,
        fluidLotId: syrup.id,
        temperatureC,
        drops: dropsFor(sphereOf("G6"), syrup, roomC),
      };
      await handInDropLog(db, {
        access,
        labId: viscometryLab.id,
        input,
        idempotencyKey: `demo-visc-${membershipId}`,
        now: new Date(now - DAY_MS),
      });
    }
  }
}
