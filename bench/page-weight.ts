/**
 * `npm run bench:page-weight`: the bytes of the staff pages that grow with a class, from the demo build
 * (`npm run build:demo` first), as ratios to the sign-in page measured in the same run: the marking
 * desk of the demo's drag lab for its 45 students and again with the class grown to 2,000, and the
 * class comparison. Each document is split into its hydration payload (the turbo-stream in the
 * `<script>` tags that React Router serialises the loader data into) and the rest of the HTML.
 */
import { createBenchDatabase } from "./support";

const LARGE_CLASS = 2_000;

const bench = await createBenchDatabase();
const { db } = await import("~/server/db.server");
const { sql } = await import("drizzle-orm");
const { seedDemo } = await import("../seeds/seed-demo");
const { buildDemoScenario, demoCourse } = await import("../seeds/demo-scenario");
const { appRequest, createAppHandler, sessionCookieFor } = await import("../tests/support/app-requests");
const { documentWeight } = await import("../tests/support/document-weight");
const { seedMarkingClass } = await import("../tests/support/marking-class");
const { quietClass } = await import("../tests/support/comparison-class");

await seedDemo(db);
const handle = await createAppHandler();
const [lab] = (
  await db.execute<{ id: string; course_id: string; cohort_id: string; instructor_id: string; students: number }>(sql`
    select l.id, l.course_id, (select id from cohorts where course_id = c.id order by position limit 1) as cohort_id,
      (select u.id from users u where u.email = ${buildDemoScenario().instructor.email}) as instructor_id,
      (select count(*)::int from course_memberships m where m.course_id = c.id and m.role = 'student') as students
    from labs l join courses c on c.id = l.course_id
    where c.code = ${demoCourse.code} and c.term = ${demoCourse.term} and l.kind = 'drag' order by l.created_at limit 1`)
).rows;
const cookie = await sessionCookieFor(lab.instructor_id);
const weigh = async (path: string, withCookie = true) => {
  const response = await handle(appRequest(path, { cookie: withCookie ? cookie : null }));
  if (response.status !== 200) throw new Error(`${path} answered ${response.status}`);
  return documentWeight(await response.text());
};
const desk = `/courses/${lab.course_id}/labs/${lab.id}/marking`;
const comparison = `/courses/${lab.course_id}/labs/${lab.id}/comparison`;

const floor = await weigh("/sign-in", false);
const rows: [string, Awaited<ReturnType<typeof weigh>>][] = [
  ["sign-in (the floor)", floor],
  [`desk, ${lab.students} students`, await weigh(desk)],
  [`comparison, ${lab.students} students`, await weigh(comparison)],
];
await seedMarkingClass(db, {
  courseId: lab.course_id,
  labId: lab.id,
  cohortId: lab.cohort_id,
  figures: quietClass(LARGE_CLASS - lab.students),
  label: "weight",
});
rows.push([`desk, ${LARGE_CLASS} students`, await weigh(desk)], [`comparison, ${LARGE_CLASS} students`, await weigh(comparison)]);

const kb = (bytes: number) => `${(bytes / 1024).toFixed(1)} KB`;
for (const [name, weight] of rows)
  console.log(
    `${name.padEnd(28)} ${kb(weight.total).padStart(9)} (${(weight.total / floor.total).toFixed(2)}× sign-in)` +
      ` · hydration ${kb(weight.hydration).padStart(9)} (${(weight.hydration / floor.hydration).toFixed(2)}×)` +
      ` · rest ${kb(weight.total - weight.hydration).padStart(9)}`,
  );
await bench.drop();
