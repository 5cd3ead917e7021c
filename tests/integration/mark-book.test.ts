/**
 * The term mark book on a real PostgreSQL: totals worked by hand (weights, a 0-weight lab, an
 * unreleased mark, drop-the-lowest), a TA's cohort scope, sorting, filtering and paging, the constant
 * statement count, the settings form and both exports parsed back.
 */
import { and, eq, sql } from "drizzle-orm";
import Papa from "papaparse";
import { beforeAll, describe, expect, it } from "vitest";
import {
  auditEvents,
  cohorts,
  courseMemberships,
  courses,
  dropLogs,
  labCohorts,
  labs,
  marks,
  rubricCriteria,
  taCohortAssignments,
  users,
} from "~/db/schema";
import { markBookSearch, type MarkBookQuery } from "~/lib/marking/mark-book";
import { db } from "~/server/db.server";
import { markBookPage, markBookRows, type MarkBookRow } from "~/server/marking/mark-book.server";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { countStatements } from "../support/count-statements";
import { courseAccess, seedMarkBookClass } from "../support/mark-book-class";

const day = 24 * 3600 * 1000;
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };
const query = (extra: Partial<MarkBookQuery> = {}): MarkBookQuery => ({
  sort: { by: "name", direction: "asc" },
  paging: { page: 1, pageSize: 50 },
  ...extra,
});

/**
 * The hand-worked course. Labs, by due time, with their rubric maxima and weights:
 *   L1 "Drag" 20 points (one criterion), weight 1
 *   L2 "Viscometry" 10 points (6 + 4), weight 2
 *   L3 "Practice" 10 points, weight 0 (left out)
 *   L4 "Wall effect" 50 points, weight 1, set for cohort A only
 * Students: Ada, Ben and Eve in cohort A; Cy and Dee in cohort B.
 */
let book: {
  courseId: string;
  code: string;
  cohortA: string;
  cohortB: string;
  lab: Record<"L1" | "L2" | "L3" | "L4", string>;
  student: Record<"Ada" | "Ben" | "Cy" | "Dee" | "Eve", { userId: string; membershipId: string }>;
  instructor: { userId: string; membershipId: string };
  ta: { userId: string; membershipId: string };
};
const instructorAccess = () =>
  courseAccess({ id: book.courseId, code: book.code }, { ...book.instructor, role: "instructor" }, [book.cohortA, book.cohortB]);
const taAccess = () => courseAccess({ id: book.courseId, code: book.code }, { ...book.ta, role: "ta" }, [book.cohortA]);
const setDropLowest = (n: number) => db.update(courses).set({ markBookDropLowest: n }).where(eq(courses.id, book.courseId));
const byName = (rows: MarkBookRow[]) => Object.fromEntries(rows.map((row) => [row.name, row]));

beforeAll(async () => {
  const code = "mark-book-by-hand";
  const [course] = await db.insert(courses).values({ title: "Settling Spheres", code, term: "Test term", timeZone: "UTC" }).returning();
  const [cohortA, cohortB] = await db
    .insert(cohorts)
    .values([
      { courseId: course.id, name: "Cohort A" },
      { courseId: course.id, name: "Cohort B" },
    ])
    .returning();
  const names = ["Ada", "Ben", "Cy", "Dee", "Eve", "Instructor", "Ta"] as const;
  const userRows = await db
    .insert(users)
    .values(
      names.map((name, index) => ({
        email: `${name.toLowerCase()}@${code}.example`,
        name,
        studentNumber: index < 5 ? `N${index + 1}` : null,
      })),
    )
    .returning({ id: users.id });
  const memberRows = await db
    .insert(courseMemberships)
    .values(
      names.map((name, index) => ({
        courseId: course.id,
        userId: userRows[index].id,
        role: name === "Instructor" ? ("instructor" as const) : name === "Ta" ? ("ta" as const) : ("student" as const),
        cohortId: (["Ada", "Ben", "Eve"] as string[]).includes(name) ? cohortA.id : index < 5 ? cohortB.id : null,
      })),
    )
    .returning({ id: courseMemberships.id });
  const person = (index: number) => ({ userId: userRows[index].id, membershipId: memberRows[index].id });
  await db.insert(taCohortAssignments).values({ membershipId: memberRows[6].id, cohortId: cohortA.id });
  const labSpecs = [
    { key: "L1", title: "Drag", weight: 1, criteria: [20] },
    { key: "L2", title: "Viscometry", weight: 2, criteria: [6, 4] },
    { key: "L3", title: "Practice", weight: 0, criteria: [10] },
    { key: "L4", title: "Wall effect", weight: 1, criteria: [50] },
  ] as const;
  const now = Date.now();
  const labRows = await db
    .insert(labs)
    .values(
      labSpecs.map((spec, index) => ({
        courseId: course.id,
        title: spec.title,
        kind: "drag" as const,
        status: "closed" as const,
        opensAt: new Date(now - (40 - index * 7) * day),
        dueAt: new Date(now - (30 - index * 7) * day),
        resolutions,
        markWeight: spec.weight,
      })),
    )
    .returning({ id: labs.id });
  // A draft lab is not in the mark book.
  await db
    .insert(labs)
    .values({ courseId: course.id, title: "Draft", kind: "drag", opensAt: new Date(now), dueAt: new Date(now + day), resolutions });
  const lab = Object.fromEntries(labSpecs.map((spec, index) => [spec.key, labRows[index].id])) as typeof book.lab;
  await db.insert(rubricCriteria).values(
    labSpecs.flatMap((spec, index) =>
      spec.criteria.map((maxPoints, position) => ({
        labId: labRows[index].id,
        position,
        title: `Part ${position + 1}`,
        kind: "range" as const,
        maxPoints,
      })),
    ),
  );
  await db
    .insert(labCohorts)
    .values([
      ...[lab.L1, lab.L2, lab.L3].flatMap((labId) => [cohortA.id, cohortB.id].map((cohortId) => ({ labId, cohortId }))),
      { labId: lab.L4, cohortId: cohortA.id },
    ]);
  book = {
    courseId: course.id,
    code,
    cohortA: cohortA.id,
    cohortB: cohortB.id,
    lab,
    student: { Ada: person(0), Ben: person(1), Cy: person(2), Dee: person(3), Eve: person(4) },
    instructor: person(5),
    ta: person(6),
  };
  const released = new Date(now - day);
  const mark = (who: keyof typeof book.student, labKey: keyof typeof lab, total: number, releasedAt: Date | null = released) => ({
    labId: lab[labKey],
    membershipId: book.student[who].membershipId,
    total,
    releasedAt,
  });
  await db.insert(marks).values([
    mark("Ada", "L1", 15), // 15 / 20 = 75 %
    mark("Ada", "L2", 8), // 8 / 10 = 80 %
    mark("Ada", "L3", 10), // 10 / 10 = 100 %, weight 0
    mark("Ada", "L4", 50, null), // marked, not released
    mark("Ben", "L1", 10), // 50 %
    mark("Ben", "L2", 10), // 100 %
    mark("Ben", "L4", 25), // 25 / 50 = 50 %
    mark("Dee", "L2", 6), // 60 %
    mark("Eve", "L1", 10), // 50 %
    mark("Eve", "L2", 5), // 50 %
    mark("Eve", "L3", 10), // 100 %, weight 0
    mark("Eve", "L4", 50), // 100 %
  ]);
  // Cy handed L1 in and has no mark yet (the version's id is all the mark book reads).
  await db.insert(dropLogs).values({ labId: lab.L1, membershipId: book.student.Cy.membershipId, latestVersionId: crypto.randomUUID() });
});

describe("term totals, worked by hand", () => {
  it("weights the released labs, leaves out weight 0 and unreleased marks, and shows nothing for a student with none", async () => {
    await setDropLowest(0);
    const { rows, total, labs: bookLabs } = await markBookPage(db, instructorAccess(), query());
    expect(total).toBe(5);
    expect(bookLabs.map((lab) => [lab.title, lab.maximum, lab.weight])).toEqual([
      ["Drag", 20, 1],
      ["Viscometry", 10, 2],
      ["Practice", 10, 0],
      ["Wall effect", 50, 1],
    ]);
    const row = byName(rows);
    // Ada: (1·75 + 2·80) / (1 + 2) = 235 / 3 = 78.33…; L3 (weight 0) and L4 (not released) left out.
    expect(row.Ada.total).toBeCloseTo(235 / 3, 10);
    expect(row.Ada.counted).toBe(2);
    expect(row.Ada.cells[book.lab.L3]).toMatchObject({ standing: "released", percent: 100, use: "left-out" });
    expect(row.Ada.cells[book.lab.L4]).toMatchObject({ standing: "unreleased", percent: null, points: null, use: null });
    expect(row.Ada.cells[book.lab.L1]).toMatchObject({ standing: "released", points: 15, percent: 75, use: "counted" });
    // Ben: (1·50 + 2·100 + 1·50) / (1 + 2 + 1) = 300 / 4 = 75.
    expect(row.Ben.total).toBeCloseTo(75, 10);
    expect(row.Ben.counted).toBe(3);
    expect(row.Ben.cells[book.lab.L3].standing).toBe("missing");
    // Cy: nothing released, so no total; L1 handed in, not marked; L4 is not set for cohort B.
    expect(row.Cy).toMatchObject({ total: null, counted: 0, dropped: 0 });
    expect(row.Cy.cells[book.lab.L1].standing).toBe("unreleased");
    expect(row.Cy.cells[book.lab.L2].standing).toBe("missing");
    expect(row.Cy.cells[book.lab.L4].standing).toBe("not-set");
    // Dee: 2·60 / 2 = 60. Eve: (1·50 + 2·50 + 1·100) / (1 + 2 + 1) = 250 / 4 = 62.5.
    expect(row.Dee.total).toBeCloseTo(60, 10);
    expect(row.Eve.total).toBeCloseTo(62.5, 10);
    // No draft lab among the cells.
    expect(Object.keys(row.Ada.cells).sort()).toEqual(Object.values(book.lab).sort());
  });

  it("drops each student's lowest percentages among their weighted labs, never all of them", async () => {
    await setDropLowest(1);
    let row = byName((await markBookRows(db, instructorAccess(), query())).rows);
    // Ada: 75 (L1) is her lowest weighted lab and goes; 2·80 / 2 = 80.
    expect(row.Ada).toMatchObject({ counted: 1, dropped: 1 });
    expect(row.Ada.total).toBeCloseTo(80, 10);
    expect(row.Ada.cells[book.lab.L1].use).toBe("dropped");
    // Ben: one of his two 50s goes (equal weights, either gives the same): (2·100 + 1·50) / 3 = 250 / 3.
    expect(row.Ben).toMatchObject({ counted: 2, dropped: 1 });
    expect(row.Ben.total).toBeCloseTo(250 / 3, 10);
    // Dee has one lab only: it stays. 2·60 / 2 = 60.
    expect(row.Dee).toMatchObject({ counted: 1, dropped: 0 });
    expect(row.Dee.total).toBeCloseTo(60, 10);
    // Eve: L1 (weight 1) and L2 (weight 2) are both 50 %, her lowest; the heavier one goes, the better
    // total for her: without L2, (1·50 + 1·100) / 2 = 75 (without L1 it would be (2·50 + 1·100) / 3 = 66.67).
    expect(row.Eve).toMatchObject({ counted: 2, dropped: 1 });
    expect(row.Eve.total).toBeCloseTo(75, 10);
    expect(row.Eve.cells[book.lab.L2].use).toBe("dropped");
    expect(row.Eve.cells[book.lab.L1].use).toBe("counted");

    await setDropLowest(5);
    row = byName((await markBookRows(db, instructorAccess(), query())).rows);
    // Ben: at most 3 − 1 = 2 dropped; his best, L2 at 100 %, stays: 2·100 / 2 = 100.
    expect(row.Ben).toMatchObject({ counted: 1, dropped: 2 });
    expect(row.Ben.total).toBeCloseTo(100, 10);
    // Ada keeps L2 (80 %); Eve keeps L4 (100 %), both 50s dropped.
    expect(row.Ada.total).toBeCloseTo(80, 10);
    expect(row.Eve).toMatchObject({ counted: 1, dropped: 2 });
    expect(row.Eve.total).toBeCloseTo(100, 10);
    await setDropLowest(0);
  });
});

describe("who sees whom, and the table's order, filters and pages", () => {
  it("shows a TA the students of their cohorts only", async () => {
    const { rows, total, cohorts: visible } = await markBookPage(db, taAccess(), query());
    expect(rows.map((row) => row.name)).toEqual(["Ada", "Ben", "Eve"]);
    expect(total).toBe(3);
    expect(visible.map((cohort) => cohort.name)).toEqual(["Cohort A"]);
    // Asking for another cohort gives nothing rather than its students.
    expect((await markBookRows(db, taAccess(), query({ cohortId: book.cohortB }))).rows).toEqual([]);
  });

  it("sorts by the term total, a lab or a column, filters by name, e-mail and cohort, and pages", async () => {
    const names = async (extra: Partial<MarkBookQuery>) =>
      (await markBookRows(db, instructorAccess(), query(extra))).rows.map((row) => row.name);
    // Totals: Ada 78.3, Ben 75, Eve 62.5, Dee 60, Cy none (last either way).
    expect(await names({ sort: { by: "total", direction: "desc" } })).toEqual(["Ada", "Ben", "Eve", "Dee", "Cy"]);
    expect(await names({ sort: { by: "total", direction: "asc" } })).toEqual(["Dee", "Eve", "Ben", "Ada", "Cy"]);
    // L2: Dee 60, Ada 80, Ben 100, Eve 50; Cy has none.
    expect(await names({ sort: { by: { labId: book.lab.L2 }, direction: "desc" } })).toEqual(["Ben", "Ada", "Dee", "Eve", "Cy"]);
    expect(await names({ sort: { by: "cohort", direction: "desc" } })).toEqual(["Cy", "Dee", "Ada", "Ben", "Eve"]);
    expect(await names({ search: "BEN" })).toEqual(["Ben"]);
    expect(await names({ search: "dee@mark-book" })).toEqual(["Dee"]);
    // A LIKE wildcard typed is a character, not "anything".
    expect(await names({ search: "%" })).toEqual([]);
    expect(await names({ cohortId: book.cohortA })).toEqual(["Ada", "Ben", "Eve"]);
    const second = await markBookRows(db, instructorAccess(), query({ paging: { page: 2, pageSize: 2 } }));
    expect(second.rows.map((row) => row.name)).toEqual(["Cy", "Dee"]);
    expect(second.total).toBe(5);
    const beyond = await markBookRows(db, instructorAccess(), query({ paging: { page: 9, pageSize: 2 } }));
    expect(beyond).toEqual({ rows: [], total: 5 });
  });

  it("reads its order from the URL and refuses what it does not know", () => {
    const parse = (search: string) => markBookSearch.safeParse(Object.fromEntries(new URLSearchParams(search)));
    expect(parse(`sort=-${book.lab.L2}&page=2&size=10`).data).toMatchObject({
      sort: { by: { labId: book.lab.L2 }, direction: "desc" },
      paging: { page: 2, pageSize: 10 },
    });
    expect(parse("sort=-total").data?.sort).toEqual({ by: "total", direction: "desc" });
    expect(parse("sort=grade").success).toBe(false);
  });

  it("costs the same statements for 10 students as for 1,000", async () => {
    const statementsFor = async (students: number) => {
      const course = await seedMarkBookClass(db, { label: `mark-book-${students}`, students, labs: 8 });
      const { statements, result } = await countStatements(() =>
        markBookPage(db, course.instructor, query({ sort: { by: "total", direction: "desc" }, paging: { page: 1, pageSize: 5 } })),
      );
      expect(result.total).toBe(students);
      expect(result.rows).toHaveLength(5);
      expect(result.labs).toHaveLength(8);
      return statements;
    };
    const few = await statementsFor(10);
    expect(few).toBe(2);
    expect(await statementsFor(1000)).toBe(few);
  });
});

describe("through the app", () => {
  let handle: AppHandler;
  beforeAll(async () => {
    handle = await createAppHandler();
  });
  const get = async (path: string, who: { userId: string }) => handle(appRequest(path, { cookie: await sessionCookieFor(who.userId) }));
  const parseCsv = async (response: Response) =>
    Papa.parse<Record<string, string>>((await response.text()).replace(/^\uFEFF/, ""), { header: true, skipEmptyLines: true });

  it("saves the weights and the dropped labs in one go, audited, and refuses a negative weight keeping what was typed", async () => {
    const cookie = await sessionCookieFor(book.instructor.userId);
    const path = `/courses/${book.courseId}/mark-book/settings`;
    const labIds = Object.values(book.lab);
    const form = (weights: string[], dropLowest: string) => ({
      dropLowest,
      ...Object.fromEntries(
        labIds.flatMap((labId, index) => [
          [`labs[${index}].labId`, labId],
          [`labs[${index}].weight`, weights[index]],
        ]),
      ),
    });
    const refused = await handle(appRequest(path, { cookie, form: form(["1", "-2", "0", "1"], "1") }));
    expect(refused.status).toBe(400);
    const refusedPage = await refused.text();
    expect(refusedPage).toContain("A weight cannot be negative");
    expect(refusedPage).toContain('value="-2"');
    const saved = await handle(appRequest(path, { cookie, form: form(["1", "2,5", "0", "1"], "1") }));
    expect(saved.status).toBe(200);
    const weights = await db.select({ id: labs.id, weight: labs.markWeight }).from(labs).where(eq(labs.courseId, book.courseId));
    expect(Object.fromEntries(weights.map((lab) => [lab.id, lab.weight]))).toMatchObject({
      [book.lab.L1]: 1,
      [book.lab.L2]: 2.5,
      [book.lab.L3]: 0,
    });
    const [course] = await db.select({ dropLowest: courses.markBookDropLowest }).from(courses).where(eq(courses.id, book.courseId));
    expect(course.dropLowest).toBe(1);
    const audits = await db
      .select({ detail: auditEvents.detail })
      .from(auditEvents)
      .where(and(eq(auditEvents.courseId, book.courseId), eq(auditEvents.action, "markbook.settings_changed")));
    expect(audits).toHaveLength(1);
    expect(audits[0].detail).toMatchObject({ dropLowest: 1, weights: { [book.lab.L2]: 2.5 } });
    // Back as they were, for the exports below.
    await db.update(labs).set({ markWeight: 2 }).where(eq(labs.id, book.lab.L2));
    await setDropLowest(0);
  });

  it("exports the mark book in our long layout, the viewer's students only, audited", async () => {
    const response = await get(`/courses/${book.courseId}/mark-book.csv?sort=-total`, book.instructor);
    expect(response.status).toBe(200);
    expect(response.headers.get("content-disposition")).toContain("mark-book.csv");
    const { data, meta } = await parseCsv(response);
    expect(meta.fields).toEqual([
      "student_name",
      "email",
      "student_number",
      "cohort",
      "lab",
      "lab_due_at",
      "weight",
      "points",
      "maximum",
      "percent",
      "standing",
      "in_term_total",
      "term_total_percent",
      "labs_counted",
      "labs_dropped",
    ]);
    // Five students × four labs, in the page's order (highest total first): Ada's rows come first.
    expect(data).toHaveLength(20);
    expect(data[0]).toMatchObject({ student_name: "Ada", lab: "Drag", points: "15", maximum: "20", percent: "75", standing: "released" });
    const ada = data.filter((row) => row.student_name === "Ada");
    expect(ada.map((row) => row.term_total_percent)).toEqual(["78.33", "78.33", "78.33", "78.33"]);
    expect(ada.find((row) => row.lab === "Practice")).toMatchObject({
      weight: "0",
      percent: "100",
      in_term_total: "left out (weight 0 or no rubric)",
    });
    expect(ada.find((row) => row.lab === "Wall effect")).toMatchObject({ points: "", percent: "", standing: "not released" });
    expect(data.find((row) => row.student_name === "Cy" && row.lab === "Wall effect")?.standing).toBe("not set for the cohort");

    const ta = await parseCsv(await get(`/courses/${book.courseId}/mark-book.csv`, book.ta));
    expect([...new Set(ta.data.map((row) => row.student_name))]).toEqual(["Ada", "Ben", "Eve"]);

    const exports = await db
      .select({ actorId: auditEvents.actorId, detail: auditEvents.detail })
      .from(auditEvents)
      .where(and(eq(auditEvents.courseId, book.courseId), eq(auditEvents.action, "markbook.exported")));
    expect(exports.map((event) => [event.actorId, event.detail.layout, event.detail.students])).toEqual(
      expect.arrayContaining([
        [book.instructor.userId, "benchpost", 5],
        [book.ta.userId, "benchpost", 3],
      ]),
    );
  });

  it("exports the released marks as a OneRoster 1.2 results.csv", async () => {
    const response = await get(`/courses/${book.courseId}/mark-book/oneroster-results.csv`, book.instructor);
    expect(response.status).toBe(200);
    const { data, meta } = await parseCsv(response);
    expect(meta.fields?.slice(0, 5)).toEqual(["sourcedId", "status", "dateLastModified", "lineItemSourcedId", "studentSourcedId"]);
    // The released marks only: Ada 3, Ben 3, Dee 1, Eve 4 — not Ada's unreleased L4.
    const released = await db
      .select({ id: marks.id, total: marks.total })
      .from(marks)
      .innerJoin(labs, eq(labs.id, marks.labId))
      .where(and(eq(labs.courseId, book.courseId), sql`${marks.releasedAt} is not null`));
    expect(released).toHaveLength(11);
    expect(data.map((row) => row.sourcedId).sort()).toEqual(released.map((mark) => mark.id).sort());
    const benL4 = data.find((row) => row.studentSourcedId === book.student.Ben.userId && row.lineItemSourcedId === book.lab.L4);
    expect(benL4).toMatchObject({ status: "active", classSourcedId: book.courseId, scoreStatus: "fully graded", score: "25" });
    expect(benL4?.scoreDate).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    expect(new Date(benL4!.dateLastModified).toISOString()).toBe(benL4!.dateLastModified);

    const ta = await parseCsv(await get(`/courses/${book.courseId}/mark-book/oneroster-results.csv`, book.ta));
    expect(new Set(ta.data.map((row) => row.studentSourcedId))).toEqual(
      new Set([book.student.Ada.userId, book.student.Ben.userId, book.student.Eve.userId]),
    );
  });

  it("keeps an archived course's mark book exportable, and its settings closed", async () => {
    await db.update(courses).set({ archivedAt: new Date() }).where(eq(courses.id, book.courseId));
    try {
      expect((await get(`/courses/${book.courseId}/mark-book.csv`, book.instructor)).status).toBe(200);
      expect((await get(`/courses/${book.courseId}/mark-book`, book.instructor)).status).toBe(200);
      const cookie = await sessionCookieFor(book.instructor.userId);
      const post = await handle(appRequest(`/courses/${book.courseId}/mark-book/settings`, { cookie, form: { dropLowest: "1" } }));
      expect(post.status).toBe(409);
    } finally {
      await db.update(courses).set({ archivedAt: null }).where(eq(courses.id, book.courseId));
    }
  });

  it("renders the page for the instructor with the total and the counted labs, paged and filtered by the URL", async () => {
    const response = await get(`/courses/${book.courseId}/mark-book?sort=-total&size=5&search=ada`, book.instructor);
    expect(response.status).toBe(200);
    const page = await response.text();
    expect(page).toContain("78.3 %");
    expect(page).not.toContain(">Ben<");
    expect((await get(`/courses/${book.courseId}/mark-book?sort=grade`, book.instructor)).status).toBe(400);
  });
});
