/**
 * `npm run bench:roster`: a 5,000-row roster imported in one transaction (checks, invitations and
 * their queued e-mails). Budget: 3 s. Each round imports into a course of its own.
 */
import { createBenchDatabase, summarise } from "./support";

const ROWS = 5_000;
const ROUNDS = 3;
const BUDGET_MS = 3_000;

const bench = await createBenchDatabase();
const { db } = await import("~/server/db.server");
const { importRoster } = await import("~/server/members/roster-import.server");
const { createAccessFixture } = await import("../tests/support/access-fixture");

const timings: number[] = [];
for (let round = 0; round < ROUNDS; round++) {
  const fixture = await createAccessFixture(`bench${round}`);
  const rows = Array.from({ length: ROWS }, (_, index) => ({
    line: index + 2,
    email: `student${index}@round${round}.example`,
    name: `Student ${index}`,
    cohort: index % 2 ? "Cohort one" : "Cohort two",
    role: "student",
    studentNumber: `s${round}${index}`,
  }));
  const started = performance.now();
  const result = await importRoster(db, {
    courseId: fixture.courseId,
    inviter: { id: fixture.userIds.instructor, name: "Bench" },
    importKey: `bench-round-${round}`,
    rows,
  });
  timings.push(performance.now() - started);
  if (!result.ok || result.duplicate || result.invited !== ROWS)
    throw new Error(`Round ${round} did not import every row: ${JSON.stringify(result).slice(0, 200)}`);
}
const { median, best } = summarise(timings);
console.log(
  `roster import of ${ROWS} rows in one transaction: median ${median.toFixed(0)} ms, best ${best.toFixed(0)} ms over ${ROUNDS} rounds`,
);
console.log(`budget ${BUDGET_MS} ms: ${median <= BUDGET_MS ? "PASS" : "OVER"}`);
await bench.drop();
