/**
 * The demo's marking: a rubric on each lab (levels, a range and the four automatic rules), the drag
 * lab marked at the desk by the Tuesday TA (all of the Tuesday bench) and the Wednesday TA (most of
 * theirs), one mark moderated, the lab marked ready and released (its e-mails queued in the outbox
 * for the worker, as every e-mail is), and one released mark changed afterwards with a reason. The
 * viscometry lab is only started. Everything goes through the server's own marking functions.
 * Invented demo data: never a test's expected value.
 */
import type { Faker } from "@faker-js/faker";
import { and, eq, inArray } from "drizzle-orm";
import { cohorts, courseMemberships, courses, labs, taCohortAssignments, users } from "~/db/schema";
import type { RubricInput } from "~/lib/marking/rubric";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Database } from "~/server/db.server";
import { loadMarkingDesk } from "~/server/marking/marking-desk.server";
import { loadMarkingLab, type MarkingLab } from "~/server/marking/marking-lab.server";
import { applyToMany, saveMark } from "~/server/marking/marks.server";
import { markLabReady, releaseMarks } from "~/server/marking/moderation.server";
import { saveRubric } from "~/server/marking/rubrics.server";
import { buildDemoScenario } from "./demo-scenario";

type Criteria = RubricInput["criteria"];

const dragRubric = [
  {
    kind: "levels",
    title: "Set-up and photos",
    description: "The photo shows what the log says was used.",
    levels: [
      { points: 0, description: "No photo and no description of the set-up." },
      { points: 1, description: "A photo, but the bands or the thermometer cannot be read." },
      { points: 2, description: "The column, both bands and the thermometer are visible." },
    ],
  },
  {
    kind: "levels",
    title: "Timing technique",
    description: "How the drops were timed, as the notes and the spread of the times show.",
    levels: [
      { points: 0, description: "No timing described; times spread widely." },
      { points: 1, description: "Started and stopped at the bands, but parallax not avoided." },
      { points: 2, description: "Eye level with each band; a stray drop noticed and explained." },
      { points: 3, description: "As above, and the sphere released below the surface at the axis." },
    ],
  },
  {
    kind: "range",
    title: "Discussion of the drag coefficient",
    description: "Compares C_D with the reference curve and names the largest uncertainty.",
    minPoints: 0,
    maxPoints: 4,
  },
  { kind: "auto", title: "Required number of drops", description: "", rule: "required_drops", maxPoints: 2, params: {} },
  {
    kind: "auto",
    title: "Within 10 % of the reference drag",
    description: "",
    rule: "within_reference",
    maxPoints: 3,
    params: { tolerancePercent: 10 },
  },
  { kind: "auto", title: "Agrees with the class", description: "", rule: "not_outlier", maxPoints: 2, params: { suspectPoints: 1 } },
  { kind: "auto", title: "Handed in on time", description: "", rule: "on_time", maxPoints: 1, params: { latePenaltyPoints: 1 } },
] satisfies Criteria;

const viscometryRubric = [
  {
    kind: "levels",
    title: "Temperature control",
    description: "Syrup changes viscosity by several per cent per kelvin.",
    levels: [
      { points: 0, description: "No temperature recorded." },
      { points: 1, description: "Recorded once." },
      { points: 2, description: "Recorded before and after, and steady." },
    ],
  },
  {
    kind: "range",
    title: "Validity of Stokes' law",
    description: "Checks the Reynolds number and says whether the Oseen correction matters.",
    minPoints: 0,
    maxPoints: 3,
  },
  { kind: "auto", title: "Required number of drops", description: "", rule: "required_drops", maxPoints: 1, params: {} },
  {
    kind: "auto",
    title: "Within 15 % of the lot's calibration",
    description: "",
    rule: "within_reference",
    maxPoints: 3,
    params: { tolerancePercent: 15 },
  },
  { kind: "auto", title: "Agrees with the class", description: "", rule: "not_outlier", maxPoints: 2, params: {} },
  { kind: "auto", title: "Handed in on time", description: "", rule: "on_time", maxPoints: 1, params: {} },
] satisfies Criteria;

const feedbackLines = [
  "Clear photo and tidy log. Say which band you started the watch at.",
  "Good spread of drops. Your discussion should name the wall correction you relied on.",
  "The times are consistent; compare your C_D with the Schiller–Naumann curve, not with Stokes' law.",
  "Well argued. The temperature reading matters more than you suggest: the fluid's viscosity moves a few per cent per kelvin.",
  "Read the bands at eye level next time; the spread of your first three drops suggests parallax.",
];

type StaffRow = {
  userId: string;
  email: string;
  name: string;
  membershipId: string;
  role: "instructor" | "ta" | "student";
  cohortIds: string[];
};

function accessOf(course: typeof courses.$inferSelect, person: StaffRow): CourseAccess {
  return {
    user: {
      id: person.userId,
      email: person.email,
      name: person.name,
      mayCreateCourses: person.role === "instructor",
      sessionId: null,
      via: "session",
    },
    course: { id: course.id, title: course.title, code: course.code, term: course.term, timeZone: course.timeZone, archivedAt: null },
    membership: { id: person.membershipId, role: person.role, cohortId: null },
    cohortIds: person.cohortIds,
  };
}

/** Every desk row of the viewer's students for the lab (one page is the whole demo class). */
const deskRows = async (db: Database, access: CourseAccess, lab: MarkingLab) =>
  (await loadMarkingDesk(db, { access, lab, filters: { page: 1, pageSize: 200 } })).rows;

export async function seedMarking(db: Database, faker: Faker, { courseId }: { courseId: string }): Promise<void> {
  const scenario = buildDemoScenario();
  const [course] = await db.select().from(courses).where(eq(courses.id, courseId));
  const staffEmails = [scenario.instructor.email, scenario.tas[0].email, scenario.tas[1].email];
  const staffRows = await db
    .select({ userId: users.id, email: users.email, name: users.name, membershipId: courseMemberships.id, role: courseMemberships.role })
    .from(courseMemberships)
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .where(and(eq(courseMemberships.courseId, courseId), inArray(users.email, staffEmails)));
  const assignments = await db
    .select()
    .from(taCohortAssignments)
    .where(
      inArray(
        taCohortAssignments.membershipId,
        staffRows.map((row) => row.membershipId),
      ),
    );
  const courseCohorts = await db.select().from(cohorts).where(eq(cohorts.courseId, courseId));
  const staff = (email: string): StaffRow => {
    const row = staffRows.find((candidate) => candidate.email === email)!;
    const cohortIds =
      row.role === "instructor"
        ? courseCohorts.map((cohort) => cohort.id)
        : assignments.filter((a) => a.membershipId === row.membershipId).map((a) => a.cohortId);
    return { ...row, cohortIds };
  };
  const instructor = accessOf(course, staff(scenario.instructor.email));
  // The Tuesday TA and the Wednesday TA, each marking their own bench.
  const tuesday = accessOf(course, staff(scenario.tas[0].email));
  const wednesday = accessOf(course, staff(scenario.tas[1].email));

  const labRows = await db.select({ id: labs.id, kind: labs.kind }).from(labs).where(eq(labs.courseId, courseId));
  const loadLab = async (kind: "drag" | "viscometry") =>
    (await loadMarkingLab(db, courseId, labRows.find((row) => row.kind === kind)!.id))!;
  await saveRubric(db, { access: instructor, lab: await loadLab("drag"), input: { criteria: dragRubric } });
  await saveRubric(db, { access: instructor, lab: await loadLab("viscometry"), input: { criteria: viscometryRubric } });
  const drag = await loadLab("drag");
  const viscometry = await loadLab("viscometry");
  const criterion = (lab: MarkingLab, title: string) => lab.rubric.find((candidate) => candidate.title === title)!.id;

  // Nothing handed in: the TAs give the manual criteria nothing, in one bulk action each, and say so.
  for (const [access, share] of [
    [tuesday, 1],
    [wednesday, 2 / 3],
  ] as const) {
    const rows = await deskRows(db, access, drag);
    const marked = rows.slice(0, Math.ceil(rows.length * share));
    const missing = marked.filter((row) => row.status === "missing").map((row) => row.membershipId);
    if (missing.length) {
      for (const title of ["Set-up and photos", "Timing technique"]) {
        await applyToMany(db, {
          access,
          labId: drag.id,
          membershipIds: missing,
          change: { kind: "score", criterionId: criterion(drag, title), level: 1 },
        });
      }
      await applyToMany(db, {
        access,
        labId: drag.id,
        membershipIds: missing,
        change: { kind: "score", criterionId: criterion(drag, "Discussion of the drag coefficient"), points: 0 },
      });
      await applyToMany(db, {
        access,
        labId: drag.id,
        membershipIds: missing,
        change: { kind: "feedback", text: "No drop log was handed in for this lab." },
      });
    }
    // The photos are mostly fine: one bulk action, then the exceptions cell by cell.
    const handedIn = marked.filter((row) => row.status !== "missing");
    await applyToMany(db, {
      access,
      labId: drag.id,
      membershipIds: handedIn.map((row) => row.membershipId),
      change: { kind: "score", criterionId: criterion(drag, "Set-up and photos"), level: 3 },
    });
    for (const row of handedIn) {
      let version = row.expectedVersion + 1;
      const save = async (change: Parameters<typeof saveMark>[1]["change"]) => {
        const result = await saveMark(db, { access, labId: drag.id, membershipId: row.membershipId, expectedVersion: version, change });
        if (result.status !== "saved") throw new Error(`The demo's marking of ${row.studentName} conflicted.`);
        version = result.mark?.version ?? version;
      };
      if (faker.number.int({ min: 0, max: 4 }) === 0)
        await save({ kind: "score", criterionId: criterion(drag, "Set-up and photos"), level: 2 });
      await save({ kind: "score", criterionId: criterion(drag, "Timing technique"), level: faker.number.int({ min: 2, max: 4 }) });
      await save({
        kind: "score",
        criterionId: criterion(drag, "Discussion of the drag coefficient"),
        points: faker.number.int({ min: 2, max: 8 }) / 2,
      });
      await save({ kind: "feedback", text: faker.helpers.arrayElement(feedbackLines) });
      // A hand-in the class comparison flags, whose notes explain it: the TA overrides the suggestion.
      if (row.flagged && row.classLabel?.label === "suspect") {
        await save({
          kind: "score",
          criterionId: criterion(drag, "Agrees with the class"),
          points: 2,
          overrideReason: "The notes explain the one slow drop; the rest of the log agrees with the class.",
        });
      }
    }
  }

  // Moderation: the Wednesday bench's discussions were marked a little harshly; the instructor raises one.
  const wednesdayRows = (await deskRows(db, wednesday, drag)).filter((row) => row.mark && row.status !== "missing");
  const lowest = [...wednesdayRows].sort((a, b) => a.total - b.total || a.studentName.localeCompare(b.studentName))[0];
  if (lowest) {
    const discussion = criterion(drag, "Discussion of the drag coefficient");
    const points = Math.min(4, (lowest.cells[discussion].points ?? 0) + 1);
    await saveMark(db, {
      access: instructor,
      labId: drag.id,
      membershipId: lowest.membershipId,
      expectedVersion: lowest.expectedVersion,
      source: "moderation",
      reason: "In line with the Tuesday bench's discussion marks for the same argument.",
      change: { kind: "score", criterionId: discussion, points },
    });
  }

  // The drag lab is released, the fully marked students only; its e-mails wait in the outbox for the worker.
  // Its late cut-off is still ahead, so the instructor confirms releasing while hand-ins are possible:
  // students with no hand-in get nothing released (they still may hand in), and a released student's
  // late hand-in is refused (the lab's default policy).
  await markLabReady(db, { access: instructor, lab: drag });
  await releaseMarks(db, { access: instructor, lab: drag, choice: { scope: "marked", zeroForNoHandIn: false, whileOpen: true } });

  // A released mark changed afterwards, with the reason the student is shown.
  const lexi = scenario.students.find((student) => student.email.startsWith("lexi.armstrong@"));
  const released = (await deskRows(db, instructor, await loadLab("drag"))).find((row) => row.email === lexi?.email && row.mark?.releasedAt);
  if (released) {
    const discussion = criterion(drag, "Discussion of the drag coefficient");
    await saveMark(db, {
      access: instructor,
      labId: drag.id,
      membershipId: released.membershipId,
      expectedVersion: released.expectedVersion,
      source: "moderation",
      reason: "The second page of your discussion had been missed; it compares C_D with the reference curve.",
      change: { kind: "score", criterionId: discussion, points: Math.min(4, (released.cells[discussion].points ?? 0) + 1) },
    });
  }

  // The viscometry lab is still open: the Tuesday TA has started on the hand-ins already in.
  const started = (await deskRows(db, tuesday, viscometry)).filter((row) => row.status !== "missing").slice(0, 4);
  if (started.length) {
    await applyToMany(db, {
      access: tuesday,
      labId: viscometry.id,
      membershipIds: started.map((row) => row.membershipId),
      change: { kind: "score", criterionId: criterion(viscometry, "Temperature control"), level: 2 },
    });
  }
}
