/**
 * The term mark book: one row per student of the viewer's cohorts (instructors see every student),
 * each lab's released mark as a percentage, and the term total.
 *
 * The rule, in one place (the overviews and the student record show the same numbers):
 * - a lab's percentage for a student is the released `marks.total` over the lab's rubric maximum (the
 *   sum of its criteria's `max_points`); only released marks (`marks.released_at is not null`) count;
 * - among the student's released labs with a weight above 0, the course's `mark_book_drop_lowest`
 *   lowest percentages are dropped, never all of them (dropping each student's lowest lab is common
 *   practice in lab courses: one bad week, a broken kit, does not sink a term);
 * - term total % = Σ wᵢ·pᵢ / Σ wᵢ over the labs that remain; none remaining: no total yet.
 *
 * The arithmetic is SQL, so PostgreSQL sorts, filters and pages on it: a page, and each export, costs
 * two statements whatever the class size (the course's labs and cohorts; the rows with their count).
 */
import { and, eq, inArray, ne, sql, type SQL } from "drizzle-orm";
import { courses, labs } from "~/db/schema";
import { AppError } from "~/lib/app-error";
import { toCsv } from "~/lib/csv";
import type { MarkBookQuery, MarkBookSettingsInput, MarkBookStanding, MarkBookUse } from "~/lib/marking/mark-book";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { uuidList } from "~/server/sql.server";

export type MarkBookLab = {
  id: string;
  title: string;
  dueAt: string;
  status: "published" | "closed";
  /** 0 leaves the lab out of the term total. */
  weight: number;
  /** The rubric's maximum points; 0 while the lab has no rubric. */
  maximum: number;
};

export type MarkBookCell = {
  standing: MarkBookStanding;
  /** Released marks only. */
  points: number | null;
  /** Points over the rubric's maximum, in percent; null without a released mark or a rubric. */
  percent: number | null;
  use: MarkBookUse | null;
  markId: string | null;
  releasedAt: string | null;
  updatedAt: string | null;
};

export type MarkBookRow = {
  membershipId: string;
  userId: string;
  name: string;
  email: string;
  studentNumber: string | null;
  cohortId: string | null;
  cohortName: string | null;
  /** Term total in percent; null while no lab counts. */
  total: number | null;
  counted: number;
  dropped: number;
  /** By lab id: every lab of the mark book has one. */
  cells: Record<string, MarkBookCell>;
};

export type MarkBookFrame = {
  dropLowest: number;
  labs: MarkBookLab[];
  /** The cohorts the viewer may see, for the cohort filter. */
  cohorts: { id: string; name: string }[];
};

/** Instructors see every student (those without a cohort too); TAs the students of their cohorts. */
const cohortScope = (access: CourseAccess): string[] | undefined =>
  access.membership.role === "instructor" ? undefined : access.cohortIds;

function assertStaff(access: CourseAccess) {
  if (access.membership.role === "student")
    throw new AppError({ code: "forbidden", status: 403, message: "The mark book is for the course's instructors and TAs." });
}

/** The course's labs in the mark book (every lab but drafts, by due time), its drop-the-lowest count and the viewer's cohorts: one statement. */
export async function markBookFrame(executor: Executor, access: CourseAccess): Promise<MarkBookFrame> {
  assertStaff(access);
  const scope = cohortScope(access);
  const [frame] = await executor
    .select({
      dropLowest: courses.markBookDropLowest,
      labs: sql<MarkBookLab[]>`coalesce((
        select json_agg(json_build_object('id', l.id, 'title', l.title, 'dueAt', l.due_at, 'status', l.status, 'weight', l.mark_weight,
          'maximum', (select coalesce(sum(rc.max_points), 0) from rubric_criteria rc where rc.lab_id = l.id))
          order by l.due_at, l.title, l.id)
        from labs l where l.course_id = ${access.course.id} and l.status <> 'draft'), '[]'::json)`,
      cohorts: sql<{ id: string; name: string }[]>`coalesce((
        select json_agg(json_build_object('id', c.id, 'name', c.name) order by c.position, c.name)
        from cohorts c where c.course_id = ${access.course.id} ${scope ? sql`and c.id in ${uuidList(scope)}` : sql``}), '[]'::json)`,
    })
    .from(courses)
    .where(eq(courses.id, access.course.id));
  return frame;
}

const sortColumns: Record<Exclude<MarkBookQuery["sort"]["by"], { labId: string }>, SQL> = {
  name: sql`lower(s.name)`,
  number: sql`s.student_number`,
  cohort: sql`s.cohort_name`,
  total: sql`t.total`,
  counted: sql`coalesce(t.counted, 0)`,
};

/**
 * The students passing the filters with their labs and term totals, sorted, and one page of them
 * (every one without `paging`), with the number that match: one statement.
 *
 * Raw SQL: a chain of CTEs with window functions (each student's labs ranked from the lowest), which
 * the query builder cannot write readably. The integration tests read every column it returns.
 */
export async function markBookRows(
  executor: Executor,
  access: CourseAccess,
  query: MarkBookQuery,
): Promise<{ rows: MarkBookRow[]; total: number }> {
  assertStaff(access);
  const courseId = access.course.id;
  const scope = cohortScope(access);
  const filters: SQL[] = [];
  if (scope) filters.push(sql`and m.cohort_id in ${uuidList(scope)}`);
  if (query.cohortId) filters.push(sql`and m.cohort_id = ${query.cohortId}`);
  if (query.search) {
    const pattern = `%${query.search.replace(/[%_\\]/g, "\\$&")}%`;
    filters.push(sql`and (u.name ilike ${pattern} or u.email ilike ${pattern})`);
  }
  const { by, direction } = query.sort;
  const sortLabId = typeof by === "object" ? by.labId : null;
  const sortKey = typeof by === "object" ? sql`sl.percent` : sortColumns[by];
  const order = sql`${sortKey} ${sql.raw(direction === "desc" ? "desc" : "asc")} nulls last, lower(s.name), s.membership_id`;
  const page = query.paging ? sql`limit ${query.paging.pageSize} offset ${(query.paging.page - 1) * query.paging.pageSize}` : sql``;

  const result = await executor.execute<MarkBookRow & { matching: number }>(sql`
    with students as (
      select m.id as membership_id, u.id as user_id, u.name, u.email, u.student_number, m.cohort_id, c.name as cohort_name
      from course_memberships m
      join users u on u.id = m.user_id
      left join cohorts c on c.id = m.cohort_id
      where m.course_id = ${courseId} and m.role = 'student' and m.removed_at is null ${sql.join(filters, sql` `)}
    ),
    lab_maxima as (
      select l.id as lab_id, l.mark_weight as weight, coalesce(sum(rc.max_points), 0) as maximum
      from labs l left join rubric_criteria rc on rc.lab_id = l.id
      where l.course_id = ${courseId} and l.status <> 'draft'
      group by l.id
    ),
    scored as (
      select mk.membership_id, mk.lab_id, lm.weight,
        case when lm.maximum > 0 then 100 * mk.total / lm.maximum end as percent
      from marks mk
      join students s on s.membership_id = mk.membership_id
      join lab_maxima lm on lm.lab_id = mk.lab_id
      where mk.released_at is not null
    ),
    -- Each student's weighted labs from the lowest percentage up. Between equal percentages the
    -- heavier lab goes first, which leaves the student the better total.
    ranked as (
      select sc.*, sc.weight > 0 and sc.percent is not null as weighted,
        row_number() over (partition by sc.membership_id, sc.weight > 0 and sc.percent is not null order by sc.percent, sc.weight desc, sc.lab_id)
          as from_lowest,
        count(*) over (partition by sc.membership_id, sc.weight > 0 and sc.percent is not null) as weighted_labs
      from scored sc
    ),
    released as (
      select r.*, case
          when not r.weighted then 'left-out'
          when r.from_lowest > least((select mark_book_drop_lowest from courses where id = ${courseId}), r.weighted_labs - 1) then 'counted'
          else 'dropped' end as use
      from ranked r
    ),
    totals as (
      select membership_id,
        sum(weight * percent) filter (where use = 'counted') / sum(weight) filter (where use = 'counted') as total,
        (count(*) filter (where use = 'counted'))::int as counted,
        (count(*) filter (where use = 'dropped'))::int as dropped,
        array_agg(lab_id) filter (where use = 'dropped') as dropped_lab_ids
      from released
      where weighted
      group by membership_id
    ),
    ordered as (
      select s.*, t.total, coalesce(t.counted, 0) as counted, coalesce(t.dropped, 0) as dropped, t.dropped_lab_ids,
        (count(*) over ())::int as matching,
        row_number() over (order by ${order}) as position
      from students s
      left join totals t on t.membership_id = s.membership_id
      ${sortLabId ? sql`left join released sl on sl.membership_id = s.membership_id and sl.lab_id = ${sortLabId}` : sql``}
    )
    -- The cells of the rows shown only, each found by index: a page costs the same whatever the class.
    select o.membership_id as "membershipId", o.user_id as "userId", o.name, o.email, o.student_number as "studentNumber",
      o.cohort_id as "cohortId", o.cohort_name as "cohortName", o.total, o.counted, o.dropped, o.matching,
      coalesce((
        select json_object_agg(lm.lab_id, json_build_object(
          'standing', case
            when mk.released_at is not null then 'released'
            when lc.lab_id is null then 'not-set'
            when mk.id is not null or d.latest_version_id is not null then 'unreleased'
            else 'missing' end,
          'points', case when mk.released_at is not null then mk.total end,
          'percent', case when mk.released_at is not null and lm.maximum > 0 then 100 * mk.total / lm.maximum end,
          'use', case
            when mk.released_at is null then null
            when lm.weight = 0 or lm.maximum = 0 then 'left-out'
            when lm.lab_id = any(o.dropped_lab_ids) then 'dropped'
            else 'counted' end,
          'markId', case when mk.released_at is not null then mk.id end,
          'releasedAt', mk.released_at,
          'updatedAt', case when mk.released_at is not null then mk.updated_at end))
        from lab_maxima lm
        left join marks mk on mk.lab_id = lm.lab_id and mk.membership_id = o.membership_id
        left join drop_logs d on d.lab_id = lm.lab_id and d.membership_id = o.membership_id
        left join lab_cohorts lc on lc.lab_id = lm.lab_id and lc.cohort_id = o.cohort_id
      ), '{}'::json) as cells
    from ordered o
    order by o.position
    ${page}`);
  const rows = result.rows.map(({ matching: _matching, ...row }) => row);
  // A page past the last has no rows to carry the count: the count is then asked for again, once.
  if (result.rows.length === 0 && query.paging && query.paging.page > 1) {
    const all = await markBookRows(executor, access, { ...query, paging: { page: 1, pageSize: 1 } });
    return { rows, total: all.total };
  }
  return { rows, total: result.rows[0]?.matching ?? 0 };
}

/** The page: the labs and the rows, side by side, two statements. */
export async function markBookPage(
  executor: Executor,
  access: CourseAccess,
  query: MarkBookQuery,
): Promise<MarkBookFrame & { rows: MarkBookRow[]; total: number }> {
  const [frame, page] = await Promise.all([markBookFrame(executor, access), markBookRows(executor, access, query)]);
  return { ...frame, ...page };
}

/** Sets the labs' weights and the drop-the-lowest count, in one transaction, audited. Labs of another course are refused. */
export async function saveMarkBookSettings(
  executor: Executor,
  { access, input, request }: { access: CourseAccess; input: MarkBookSettingsInput; request?: Request },
): Promise<void> {
  const courseId = access.course.id;
  await executor.transaction(async (tx) => {
    const labIds = input.labs.map((lab) => lab.labId);
    const known = labIds.length
      ? await tx
          .select({ id: labs.id })
          .from(labs)
          .where(and(eq(labs.courseId, courseId), ne(labs.status, "draft"), inArray(labs.id, uuidList(labIds))))
      : [];
    if (known.length !== new Set(labIds).size)
      throw new AppError({ code: "not_found", status: 404, message: "One of these labs is not in this course's mark book." });
    await tx.update(courses).set({ markBookDropLowest: input.dropLowest }).where(eq(courses.id, courseId));
    if (input.labs.length)
      await tx
        .update(labs)
        .set({
          markWeight: sql`(select (value->>'weight')::float8 from json_array_elements(${JSON.stringify(input.labs)}::json) where value->>'labId' = ${labs.id}::text)`,
        })
        .where(and(eq(labs.courseId, courseId), inArray(labs.id, uuidList(labIds))));
    await recordAudit(tx, {
      courseId,
      actorId: access.user.id,
      action: "markbook.settings_changed",
      subject: `course:${courseId}`,
      detail: { dropLowest: input.dropLowest, weights: Object.fromEntries(input.labs.map((lab) => [lab.labId, lab.weight])) },
      request,
    });
  });
}

const roundTo = (value: number | null, decimals: number) => (value === null ? null : Number(value.toFixed(decimals)));

const useWords: Record<MarkBookUse, string> = {
  counted: "counted",
  dropped: "dropped (lowest)",
  "left-out": "left out (weight 0 or no rubric)",
};
const standingWords: Record<MarkBookStanding, string> = {
  released: "released",
  unreleased: "not released",
  missing: "not handed in",
  "not-set": "not set for the cohort",
};

/**
 * Benchpost's own term export, in long form: one row per student and lab, so that a spreadsheet's
 * pivot table rebuilds any view (labs across, cohorts down…) and no lab title becomes a column name.
 * Columns: student_name, email, student_number, cohort, lab, lab_due_at, weight, points, maximum,
 * percent, standing (released / not released / not handed in / not set for the cohort), in_term_total
 * (counted / dropped / left out; empty when not released), then the student's term_total_percent,
 * labs_counted and labs_dropped, the same on each of their rows. Points and percentages are of released
 * marks only; percentages have two decimals.
 */
function benchpostCsv(frame: MarkBookFrame, rows: MarkBookRow[]): string {
  const lines = rows.flatMap((row) => frame.labs.map((lab) => ({ row, lab, cell: row.cells[lab.id] })));
  return toCsv(lines, [
    { header: "student_name", value: ({ row }) => row.name },
    { header: "email", value: ({ row }) => row.email },
    { header: "student_number", value: ({ row }) => row.studentNumber },
    { header: "cohort", value: ({ row }) => row.cohortName },
    { header: "lab", value: ({ lab }) => lab.title },
    { header: "lab_due_at", value: ({ lab }) => new Date(lab.dueAt).toISOString() },
    { header: "weight", value: ({ lab }) => lab.weight },
    { header: "points", value: ({ cell }) => cell.points },
    { header: "maximum", value: ({ lab }) => lab.maximum },
    { header: "percent", value: ({ cell }) => roundTo(cell.percent, 2) },
    { header: "standing", value: ({ cell }) => standingWords[cell.standing] },
    { header: "in_term_total", value: ({ cell }) => (cell.use ? useWords[cell.use] : null) },
    { header: "term_total_percent", value: ({ row }) => roundTo(row.total, 2) },
    { header: "labs_counted", value: ({ row }) => row.counted },
    { header: "labs_dropped", value: ({ row }) => row.dropped },
  ]);
}

/**
 * 1EdTech OneRoster 1.2, CSV binding, `results.csv`: one row per released mark, each lab a line item.
 * The column list is from memory (no copy of the specification was at hand when this was written):
 * check it against the 1EdTech OneRoster 1.2 CSV tables before relying on it in an import.
 * The sourcedIds are Benchpost's own ids (mark, lab, user, course), as a OneRoster export of ours
 * would carry them in users.csv, classes.csv and lineItems.csv; the score is the points, out of the
 * line item's maximum (the lab's rubric maximum, `resultValueMax` in lineItems.csv).
 */
const oneRosterResultColumns = [
  "sourcedId",
  "status",
  "dateLastModified",
  "lineItemSourcedId",
  "studentSourcedId",
  "classSourcedId",
  "scoreScaleSourcedId",
  "scoreStatus",
  "score",
  "textScore",
  "scoreDate",
  "comment",
] as const;

function oneRosterResultsCsv(access: CourseAccess, frame: MarkBookFrame, rows: MarkBookRow[]): string {
  const results = rows.flatMap((row) =>
    frame.labs.flatMap((lab) => {
      const cell = row.cells[lab.id];
      return cell.standing === "released" ? [{ row, lab, cell }] : [];
    }),
  );
  const values: Record<(typeof oneRosterResultColumns)[number], (result: (typeof results)[number]) => unknown> = {
    sourcedId: ({ cell }) => cell.markId,
    status: () => "active",
    dateLastModified: ({ cell }) => new Date(cell.updatedAt!).toISOString(),
    lineItemSourcedId: ({ lab }) => lab.id,
    studentSourcedId: ({ row }) => row.userId,
    classSourcedId: () => access.course.id,
    scoreScaleSourcedId: () => null,
    scoreStatus: () => "fully graded",
    score: ({ cell }) => cell.points,
    textScore: () => null,
    scoreDate: ({ cell }) => new Date(cell.releasedAt!).toISOString().slice(0, 10),
    comment: () => null,
  };
  return toCsv(
    results,
    oneRosterResultColumns.map((header) => ({ header, value: values[header] })),
  );
}

/**
 * One of the two exports of the mark book for the viewer's students (the page's filters and order,
 * every page), audited: three statements whatever the class size (labs, rows, the audit entry).
 */
export async function exportMarkBook(
  executor: Executor,
  {
    access,
    layout,
    query,
    request,
  }: { access: CourseAccess; layout: "benchpost" | "oneroster-results"; query: Omit<MarkBookQuery, "paging">; request?: Request },
): Promise<string> {
  const [frame, { rows }] = await Promise.all([markBookFrame(executor, access), markBookRows(executor, access, query)]);
  await recordAudit(executor, {
    courseId: access.course.id,
    actorId: access.user.id,
    action: "markbook.exported",
    subject: `course:${access.course.id}`,
    detail: { layout, students: rows.length, search: query.search ?? null, cohortId: query.cohortId ?? null },
    request,
  });
  return layout === "benchpost" ? benchpostCsv(frame, rows) : oneRosterResultsCsv(access, frame, rows);
}
