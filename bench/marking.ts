/**
 * `npm run bench:marking`: one bulk action of the marking desk, a level applied to 1,000 students,
 * database writes included (the marks upserted and a history row each, in one transaction, with the
 * class comparison read for the automatic criteria). Budget: 500 ms. Rounds cycle through the levels,
 * so every round changes every mark.
 */
import { createBenchDatabase, summarise } from "./support";

const STUDENTS = 1_000;
const ROUNDS = 7;
const BUDGET_MS = 500;

const bench = await createBenchDatabase();
const { db } = await import("~/server/db.server");
const { loadMarkingLab } = await import("~/server/marking/marking-lab.server");
const { saveRubric } = await import("~/server/marking/rubrics.server");
const { applyToMany } = await import("~/server/marking/marks.server");
const { createAccessFixture } = await import("../tests/support/access-fixture");
const { seedMarkingClass } = await import("../tests/support/marking-class");
const { quietClass } = await import("../tests/support/comparison-class");
type CourseAccess = import("~/server/auth/access.server").CourseAccess;

const fixture = await createAccessFixture("benchmark");
const instructor = {
  user: { id: fixture.userIds.instructor, email: "instructor@benchmark.example", name: "Test instructor", sessionId: null, via: "session" },
  course: { id: fixture.courseId, title: "Settling Spheres", code: "benchmark-A", term: "Test term", timeZone: "UTC" },
  membership: { id: fixture.membershipIds.instructor, role: "instructor", cohortId: null },
  cohortIds: [fixture.cohortId, fixture.otherCohortId],
} as unknown as CourseAccess;

await saveRubric(db, {
  access: instructor,
  lab: (await loadMarkingLab(db, fixture.courseId, fixture.labId))!,
  input: {
    criteria: [
      {
        kind: "levels",
        title: "Set-up",
        levels: [
          { points: 0, description: "None" },
          { points: 1, description: "Partly" },
          { points: 2, description: "Fully" },
        ],
      },
      { kind: "range", title: "Discussion", minPoints: 0, maxPoints: 4 },
      { kind: "auto", title: "Drops", rule: "required_drops", maxPoints: 2 },
      { kind: "auto", title: "Reference", rule: "within_reference", maxPoints: 3, params: { tolerancePercent: 10 } },
      { kind: "auto", title: "Class", rule: "not_outlier", maxPoints: 2 },
      { kind: "auto", title: "On time", rule: "on_time", maxPoints: 1 },
    ],
  },
});
const lab = (await loadMarkingLab(db, fixture.courseId, fixture.labId))!;
const setUp = lab.rubric[0];
const { membershipIds } = await seedMarkingClass(db, {
  courseId: fixture.courseId,
  labId: lab.id,
  cohortId: fixture.cohortId,
  figures: quietClass(STUDENTS),
  label: "bench",
  late: (index) => index % 9 === 0,
});
// Warm-up: the first marks are inserted, and the statements' plans cached.
await applyToMany(db, { access: instructor, labId: lab.id, membershipIds, change: { kind: "score", criterionId: setUp.id, level: 1 } });

const timings: number[] = [];
for (let round = 0; round < ROUNDS; round++) {
  const level = round % 2 ? 3 : 2;
  const started = performance.now();
  const outcome = await applyToMany(db, {
    access: instructor,
    labId: lab.id,
    membershipIds,
    change: { kind: "score", criterionId: setUp.id, level },
  });
  timings.push(performance.now() - started);
  if (outcome.changed !== STUDENTS) throw new Error(`Round ${round} (level ${level}) changed ${outcome.changed} marks`);
}
const { median, best } = summarise(timings);
console.log(
  `a level applied to ${STUDENTS} students, writes and history included: median ${median.toFixed(0)} ms, best ${best.toFixed(0)} ms over ${ROUNDS} rounds`,
);
console.log(`budget ${BUDGET_MS} ms: ${median <= BUDGET_MS ? "PASS" : "OVER"}`);
await bench.drop();
