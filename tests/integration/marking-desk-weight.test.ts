/**
 * The marking desk's weight does not grow with the class: the demo's drag lab (45 students) and the
 * same lab grown to 2,000 students answer pages of the same size, under 120 KB, with the same number
 * of SQL statements, and without any student's id from another page; the bulk action still takes
 * "every hand-in shown" (named by the filters, not by ids) and the next card to score beyond the page
 * is found by the server (`?after=`). Served by the demo build, in process.
 */
import { sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db } from "~/server/db.server";
import { buildDemoScenario, demoCourse } from "../../seeds/demo-scenario";
import { seedDemo } from "../../seeds/seed-demo";
import { appOrigin, appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { quietClass } from "../support/comparison-class";
import { countAllStatements } from "../support/count-statements";
import { documentWeight } from "../support/document-weight";
import { seedMarkingClass } from "../support/marking-class";

const LARGE_CLASS = 2_000;
const BUDGET_BYTES = 120_000;

let handle: AppHandler;
let cookie: string;
let lab: { id: string; course_id: string; cohort_id: string; students: number };
let desk: string;

beforeAll(async () => {
  await seedDemo(db);
  handle = await createAppHandler();
  [lab] = (
    await db.execute<typeof lab>(sql`
      select l.id, l.course_id, (select id from cohorts where course_id = c.id order by position limit 1) as cohort_id,
        (select count(*)::int from course_memberships m where m.course_id = c.id and m.role = 'student') as students
      from labs l join courses c on c.id = l.course_id
      where c.code = ${demoCourse.code} and c.term = ${demoCourse.term} and l.kind = 'drag' order by l.created_at limit 1`)
  ).rows;
  const [instructor] = (await db.execute<{ id: string }>(sql`select id from users where email = ${buildDemoScenario().instructor.email}`))
    .rows;
  cookie = await sessionCookieFor(instructor.id);
  desk = `/courses/${lab.course_id}/labs/${lab.id}/marking`;
}, 120_000);

async function weigh(path: string) {
  const { statements, result: response } = await countAllStatements(() => handle(appRequest(path, { cookie })));
  expect(response.status, path).toBe(200);
  const html = await response.text();
  return { ...documentWeight(html), statements, html };
}

const membershipIdsOf = (html: string) => new Set([...html.matchAll(/data-membership="([0-9a-f-]{36})"/g)].map((match) => match[1]));

describe("the marking desk's weight", () => {
  it("is under 120 KB for the demo's class and the same, page for page, for a class of 2,000", async () => {
    expect(lab.students).toBe(45);
    const small = await weigh(desk);
    expect(small.total).toBeLessThanOrEqual(BUDGET_BYTES);

    const { membershipIds } = await seedMarkingClass(db, {
      courseId: lab.course_id,
      labId: lab.id,
      cohortId: lab.cohort_id,
      figures: quietClass(LARGE_CLASS - lab.students),
      label: "weight",
    });
    const large = await weigh(desk);
    expect(large.total).toBeLessThanOrEqual(BUDGET_BYTES);
    // The same page, give or take its cards' names and figures: nothing in it counts the class.
    expect(Math.abs(large.total / small.total - 1)).toBeLessThan(0.03);
    expect(Math.abs(large.hydration / small.hydration - 1)).toBeLessThan(0.03);
    expect(large.statements).toBe(small.statements);
    // Only the page's own students: no list of every id for "select all" or "next to score".
    const shown = membershipIdsOf(large.html);
    expect(shown.size).toBeGreaterThan(0);
    expect(membershipIds.filter((id) => large.html.includes(id) && !shown.has(id))).toEqual([]);

    // The next card to score after the page's last is found by the server, on a later page.
    const last = [...shown].at(-1)!;
    const after = await weigh(`${desk}?after=${last}`);
    expect(after.html).toMatch(/Page (<!-- -->)?2(<!-- -->)? of/);
    expect(membershipIdsOf(after.html).has(last)).toBe(false);
    expect(after.statements).toBe(small.statements);
  }, 120_000);

  it("applies a bulk change to every hand-in matching the filters, beyond the page, without their ids", async () => {
    const [criterion] = (
      await db.execute<{ id: string }>(
        sql`select id from rubric_criteria where lab_id = ${lab.id} and kind = 'levels' order by position limit 1`,
      )
    ).rows;
    const [cohortSize] = (
      await db.execute<{ n: number }>(sql`select count(*)::int as n from course_memberships m
        where m.cohort_id = ${lab.cohort_id} and m.role = 'student' and m.removed_at is null`)
    ).rows;
    const excepted = (
      await db.execute<{ id: string }>(
        sql`select m.id from course_memberships m where m.cohort_id = ${lab.cohort_id} and m.role = 'student' and m.removed_at is null limit 1`,
      )
    ).rows[0].id;
    const response = await handle(
      new Request(new URL(desk, appOrigin()), {
        method: "POST",
        headers: { Cookie: cookie, Origin: appOrigin(), "Content-Type": "application/json" },
        body: JSON.stringify({
          intent: "bulk",
          selection: {
            criterionId: criterion.id,
            cohortId: lab.cohort_id,
            status: null,
            all: true,
            bands: [],
            ids: [],
            except: [excepted],
          },
          change: { kind: "score", criterionId: criterion.id, level: 1, points: null },
          reason: "Bulk test of the whole cohort",
        }),
      }),
    );
    expect(response.status).toBe(200);
    const [marked] = (
      await db.execute<{ n: number; excepted: boolean }>(sql`select count(*)::int as n,
          bool_or(mk.membership_id = ${excepted}) as excepted
        from marks mk join course_memberships m on m.id = mk.membership_id
        where mk.lab_id = ${lab.id} and m.cohort_id = ${lab.cohort_id} and (mk.scores -> ${criterion.id} ->> 'level')::int = 1`)
    ).rows;
    // Far more than a page: every hand-in of the cohort but the one taken out.
    expect(cohortSize.n).toBeGreaterThan(1_900);
    expect(marked.excepted).toBe(false);
    expect(marked.n).toBe(cohortSize.n - 1);
  }, 120_000);
});
