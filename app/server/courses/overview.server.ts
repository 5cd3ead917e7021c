/**
 * The course overview: what needs doing, for each role. Each role's page costs a fixed set of
 * statements, run side by side, whatever the class size: the counting happens in PostgreSQL.
 */
import { and, count, eq, inArray, isNull, sql, type SQL } from "drizzle-orm";
import { courseMemberships, kits, parts } from "~/db/schema";
import type { KitState } from "~/lib/kits/kit-states";
import type { PartKind } from "~/lib/kits/part-input";
import { kitCohortScope, type CourseAccess } from "~/server/auth/access.server";
import { listPartBias } from "~/server/comparison/part-quality.server";
import type { Executor } from "~/server/db.server";
import { listFailedEmails } from "~/server/email/failed-emails.server";
import { openProblemsDigest } from "~/server/kits/kit-problems.server";
import { listOverdueKits } from "~/server/kits/returns.server";
import { effectiveWindowJoin } from "~/server/labs/effective-window.server";

/** A lab stays among the deadlines this long after its due time, so that the late and missing hand-ins are followed up. */
export const RECENT_DEADLINE_DAYS = 3;
/** How many hand-ins the TA's "next to mark" list shows. */
export const NEXT_TO_MARK = 8;

/**
 * A counted hand-in (`d` with its latest version) still to mark, as the desk decides it (`markProgress`):
 * no mark yet, a criterion scored by hand still empty, or a released mark reopened by a later hand-in.
 * Automatic criteria are not looked at: they score themselves from the hand-in.
 */
const toMark = sql.raw(`(mk.id is null or mk.reopened_at is not null
  or exists (select 1 from rubric_criteria rc where rc.lab_id = d.lab_id and rc.kind <> 'auto' and not (mk.scores ? rc.id::text)))`);

/** The course's counted hand-ins by active students, with their mark if any: `d`, `s` (the student) and `mk`. */
const countedHandIns = (courseId: string) => sql`
  drop_logs d
  join labs l on l.id = d.lab_id and l.course_id = ${courseId} and l.status <> 'draft'
  join drop_log_versions v on v.id = d.latest_version_id
  join course_memberships s on s.id = d.membership_id and s.role = 'student' and s.removed_at is null
  left join marks mk on mk.lab_id = d.lab_id and mk.membership_id = d.membership_id`;

const cohortArray = (cohortIds: readonly string[]) => `{${cohortIds.join(",")}}`;

/**
 * The headline counts, the kits by state, the viewer's own kit and the open kit problems: four statements.
 * A TA's kit counts and problems are those of their cohorts' students, as their kits list shows.
 */
export async function courseOverview(executor: Executor, access: CourseAccess) {
  const courseId = access.course.id;
  const cohortIds = kitCohortScope(access);
  const heldInScope = (holder: SQL) =>
    cohortIds === undefined
      ? sql`true`
      : sql`${holder} in (select cm.id from course_memberships cm where cm.cohort_id in (select value::uuid from json_array_elements_text(${JSON.stringify(cohortIds)}::json)))`;
  const [[counts], kitRows, [myKit], openProblems] = await Promise.all([
    executor
      .select({
        students: sql<number>`count(*) filter (where ${courseMemberships.role} = 'student')::int`,
        tas: sql<number>`count(*) filter (where ${courseMemberships.role} = 'ta')::int`,
        instructors: sql<number>`count(*) filter (where ${courseMemberships.role} = 'instructor')::int`,
        kits: sql<number>`(select count(*)::int from ${kits} k where k.course_id = ${courseId} and ${heldInScope(sql`k.holder_membership_id`)})`,
      })
      .from(courseMemberships)
      .where(and(eq(courseMemberships.courseId, courseId), isNull(courseMemberships.removedAt))),
    executor
      .select({ state: kits.state, count: count() })
      .from(kits)
      .where(and(eq(kits.courseId, courseId), heldInScope(sql`${kits.holderMembershipId}`)))
      .groupBy(kits.state),
    executor.select({ number: kits.number, state: kits.state }).from(kits).where(eq(kits.holderMembershipId, access.membership.id)),
    access.membership.role === "student" ? null : openProblemsDigest(executor, courseId, cohortIds),
  ]);
  return {
    counts,
    openProblems,
    kitsByState: Object.fromEntries(kitRows.map((row) => [row.state, row.count])) as Partial<Record<KitState, number>>,
    myKit: myKit ?? null,
  };
}

export type CohortHandIns = {
  cohortId: string;
  cohortName: string;
  students: number;
  handedIn: number;
  /** Handed in after the student's own due time. */
  late: number;
  /** Nothing handed in and the student's own due time has passed. */
  missing: number;
  /** Students whose own window differs from the class's (an extension of theirs or their cohort's). */
  extended: number;
};
export type UpcomingDeadline = { labId: string; title: string; dueAt: string; lateCutoffAt: string | null; cohorts: CohortHandIns[] };

/**
 * Published labs due from a few days ago on, or whose late cut-off is still ahead, with each cohort's
 * hand-ins against its students, lateness and "missing" judged on each student's own window. One statement.
 */
async function upcomingDeadlines(executor: Executor, courseId: string, now: Date): Promise<UpcomingDeadline[]> {
  const at = now.toISOString();
  // Raw: one grouped statement over the lab, its cohorts, their students and the windows' lateral join.
  const result = await executor.execute<{
    labId: string;
    title: string;
    dueAt: string;
    lateCutoffAt: string | null;
    cohortId: string;
    cohortName: string;
    students: number;
    handedIn: number;
    late: number;
    missing: number;
    extended: number;
  }>(sql`
    select l.id as "labId", l.title, to_json(l.due_at)#>>'{}' as "dueAt", to_json(l.late_cutoff_at)#>>'{}' as "lateCutoffAt",
      c.id as "cohortId", c.name as "cohortName", count(m.id)::int as students, count(v.id)::int as "handedIn",
      count(v.id) filter (where v.late)::int as late,
      count(m.id) filter (where v.id is null and w.due_at < ${at}::timestamptz)::int as missing,
      count(m.id) filter (where w.extended_by is not null)::int as extended
    from labs l
    join lab_cohorts lc on lc.lab_id = l.id
    join cohorts c on c.id = lc.cohort_id
    left join course_memberships m on m.cohort_id = c.id and m.course_id = l.course_id and m.role = 'student' and m.removed_at is null
    ${effectiveWindowJoin({ lab: "l", member: "m", as: "w" })}
    left join drop_logs d on d.lab_id = l.id and d.membership_id = m.id
    left join drop_log_versions v on v.id = d.latest_version_id
    where l.course_id = ${courseId} and l.status = 'published'
      and (l.due_at > ${at}::timestamptz - make_interval(days => ${RECENT_DEADLINE_DAYS}) or l.late_cutoff_at > ${at}::timestamptz)
    group by l.id, c.id
    order by l.due_at, l.id, c.name`);
  const labs = new Map<string, UpcomingDeadline>();
  for (const { labId, title, dueAt, lateCutoffAt, ...cohort } of result.rows) {
    let lab = labs.get(labId);
    if (!lab) labs.set(labId, (lab = { labId, title, dueAt, lateCutoffAt, cohorts: [] }));
    lab.cohorts.push(cohort);
  }
  return [...labs.values()];
}

export type TaWorkload = {
  membershipId: string;
  name: string;
  cohortCount: number;
  /** Marks this TA saved last, in every lab. */
  marked: number;
  toMark: number;
  /** Labs with hand-ins of the TA's cohorts still to mark, by title. */
  labs: { labId: string; title: string; toMark: number }[];
};

/** Every TA of the course, also those with no cohort or nothing marked, with the hand-ins of their cohorts still to mark. One statement. */
async function taWorkloads(executor: Executor, courseId: string): Promise<TaWorkload[]> {
  // Raw: per TA and lab, the to-mark hand-ins of their cohorts; a TA with none keeps one row (lab null).
  const result = await executor.execute<{
    membershipId: string;
    name: string;
    cohortCount: number;
    marked: number;
    labId: string | null;
    title: string | null;
    toMark: number;
  }>(sql`
    with pending as (
      select d.lab_id, l.title, l.due_at, s.cohort_id, count(*)::int as n
      from ${countedHandIns(courseId)}
      where ${toMark}
      group by d.lab_id, l.title, l.due_at, s.cohort_id
    ),
    tas as (
      select ta.id, u.name, ta.user_id,
        (select count(*)::int from ta_cohort_assignments a where a.membership_id = ta.id) as cohort_count,
        (select count(*)::int from marks mk join labs ml on ml.id = mk.lab_id and ml.course_id = ${courseId} where mk.marked_by_id = ta.user_id) as marked
      from course_memberships ta join users u on u.id = ta.user_id
      where ta.course_id = ${courseId} and ta.role = 'ta' and ta.removed_at is null
    )
    select tas.id as "membershipId", tas.name, tas.cohort_count as "cohortCount", tas.marked,
      p.lab_id as "labId", p.title, coalesce(sum(p.n), 0)::int as "toMark"
    from tas
    left join ta_cohort_assignments a on a.membership_id = tas.id
    left join pending p on p.cohort_id = a.cohort_id
    group by tas.id, tas.name, tas.cohort_count, tas.marked, p.lab_id, p.title, p.due_at
    order by tas.name, tas.id, p.due_at nulls last, p.title`);
  const byTa = new Map<string, TaWorkload>();
  for (const row of result.rows) {
    let ta = byTa.get(row.membershipId);
    if (!ta)
      byTa.set(
        row.membershipId,
        (ta = { membershipId: row.membershipId, name: row.name, cohortCount: row.cohortCount, marked: row.marked, toMark: 0, labs: [] }),
      );
    if (row.labId && row.title && row.toMark > 0) {
      ta.labs.push({ labId: row.labId, title: row.title, toMark: row.toMark });
      ta.toMark += row.toMark;
    }
  }
  return [...byTa.values()];
}

export type ClassComparisonFlags = { labId: string; title: string; outliers: number; suspects: number };

/** Per lab, the counted hand-ins the class comparison labels outlier or suspect, as the relabel job last stored them. One statement. */
async function classComparisonFlags(executor: Executor, courseId: string): Promise<ClassComparisonFlags[]> {
  // Raw: a grouped count over the stored labels.
  const result = await executor.execute<ClassComparisonFlags>(sql`
    select l.id as "labId", l.title, count(*) filter (where cl.label = 'outlier')::int as outliers,
      count(*) filter (where cl.label = 'suspect')::int as suspects
    from comparison_labels cl join labs l on l.id = cl.lab_id
    where l.course_id = ${courseId} and cl.label <> 'consistent'
    group by l.id, l.title, l.due_at
    order by l.due_at, l.title`);
  return result.rows;
}

export type FlaggedPart = { partId: string; label: string; kind: PartKind; labs: string[] };

/**
 * The parts the part-bias check flags, computed as the parts pages compute them (one statement over the
 * course's counted hand-ins; the check is not stored), and their labels (one more).
 */
async function flaggedParts(executor: Executor, courseId: string): Promise<FlaggedPart[]> {
  const flagged = [...(await listPartBias(executor, courseId)).values()].filter((report) => report.flagged);
  if (flagged.length === 0) return [];
  const labels = await executor
    .select({ id: parts.id, label: parts.label, kind: parts.kind })
    .from(parts)
    .where(
      inArray(
        parts.id,
        flagged.map((report) => report.partId),
      ),
    );
  const byId = new Map(labels.map((part) => [part.id, part]));
  return flagged
    .flatMap((report) => {
      const part = byId.get(report.partId);
      const labs = [...new Set(report.comparisons.filter((comparison) => comparison.flagged).map((comparison) => comparison.labTitle))];
      return part ? [{ partId: part.id, label: part.label, kind: part.kind, labs }] : [];
    })
    .sort((a, b) => a.label.localeCompare(b.label));
}

/** Invitations still waiting: not accepted, not expired, not revoked and not replaced by a newer one. One statement. */
async function openInvitations(executor: Executor, courseId: string, now: Date) {
  // Raw: two counts in one statement.
  const result = await executor.execute<{ open: number; students: number }>(sql`
    select count(*)::int as open, count(*) filter (where role = 'student')::int as students
    from invitations
    where course_id = ${courseId} and accepted_at is null and revoked_at is null and replaced_by_id is null and expires_at > ${now.toISOString()}::timestamptz`);
  return result.rows[0];
}

/**
 * What the instructor's overview says needs doing: deadlines with each cohort's hand-ins, each TA's
 * unmarked work, the flags of the class comparison and of the part-bias check, kits (open problems,
 * not yet delivered, overdue returns), failed e-mails and invitations not accepted. A fixed set of
 * statements, run side by side.
 */
export async function instructorOverview(executor: Executor, access: CourseAccess, now = new Date()) {
  const courseId = access.course.id;
  const [headline, deadlines, tas, comparisonFlags, biasedParts, overdue, failedEmails, invitations] = await Promise.all([
    courseOverview(executor, access),
    upcomingDeadlines(executor, courseId, now),
    taWorkloads(executor, courseId),
    classComparisonFlags(executor, courseId),
    flaggedParts(executor, courseId),
    listOverdueKits(executor, courseId, { page: 1, pageSize: 1, now }),
    listFailedEmails(courseId, executor),
    openInvitations(executor, courseId, now),
  ]);
  return { ...headline, deadlines, tas, comparisonFlags, flaggedParts: biasedParts, overdueKits: overdue.total, failedEmails, invitations };
}

export type NextToMark = {
  labId: string;
  labTitle: string;
  membershipId: string;
  studentName: string;
  version: number;
  submittedAt: string;
  /** A released mark reopened by this hand-in. */
  reopened: boolean;
};
export type TaLabProgress = { labId: string; title: string; handedIn: number; toMark: number; markedByYou: number };

/**
 * The TA's overview: the oldest hand-ins of their cohorts still to mark, and per lab of their cohorts
 * how many are handed in, still to mark and marked by them. Two statements.
 */
export async function taOverview(executor: Executor, access: CourseAccess) {
  const courseId = access.course.id;
  const cohorts = cohortArray(access.cohortIds);
  // Raw: the to-mark rule is shared with the instructor's overview as a fragment over the same aliases.
  const [next, progress] = await Promise.all([
    executor.execute<NextToMark>(sql`
      select l.id as "labId", l.title as "labTitle", s.id as "membershipId", u.name as "studentName", v.version,
        to_json(v.submitted_at)#>>'{}' as "submittedAt", mk.reopened_at is not null as reopened
      from ${countedHandIns(courseId)}
      join users u on u.id = s.user_id
      where s.cohort_id = any(${cohorts}::uuid[]) and ${toMark}
      order by v.submitted_at, s.id
      limit ${NEXT_TO_MARK}`),
    executor.execute<TaLabProgress>(sql`
      select l.id as "labId", l.title, count(d.id)::int as "handedIn",
        count(d.id) filter (where ${toMark})::int as "toMark",
        count(mk.id) filter (where mk.marked_by_id = ${access.user.id})::int as "markedByYou"
      from labs l
      left join (drop_logs d
        join drop_log_versions v on v.id = d.latest_version_id
        join course_memberships s on s.id = d.membership_id and s.role = 'student' and s.removed_at is null and s.cohort_id = any(${cohorts}::uuid[])
      ) on d.lab_id = l.id
      left join marks mk on mk.lab_id = l.id and mk.membership_id = d.membership_id
      where l.course_id = ${courseId} and l.status <> 'draft'
        and exists (select 1 from lab_cohorts lc where lc.lab_id = l.id and lc.cohort_id = any(${cohorts}::uuid[]))
      group by l.id, l.title, l.due_at
      order by l.due_at, l.title`),
  ]);
  return { nextToMark: next.rows, progress: progress.rows };
}

export type StudentLabStatus = "not-handed-in" | "handed-in" | "marked" | "released";
export type StudentDue = {
  labId: string;
  title: string;
  /** The student's own times: their extension's, else their cohort's, else the lab's. */
  dueAt: string;
  lateCutoffAt: string | null;
  extended: boolean;
  status: StudentLabStatus;
  version: number | null;
  submittedAt: string | null;
  late: boolean;
};

/**
 * The student's labs with their own due time and where each stands: not handed in, handed in (the
 * version), marked (not shown yet), or released. One statement; the extension's reason is never read.
 */
export async function studentOverview(executor: Executor, access: CourseAccess): Promise<StudentDue[]> {
  // Raw: the windows' lateral join for the one student, over their cohort's labs.
  const result = await executor.execute<Omit<StudentDue, "status"> & { marked: boolean; released: boolean }>(sql`
    select l.id as "labId", l.title, to_json(w.due_at)#>>'{}' as "dueAt", to_json(w.late_cutoff_at)#>>'{}' as "lateCutoffAt",
      w.extended_by is not null as extended, v.version, to_json(v.submitted_at)#>>'{}' as "submittedAt", coalesce(v.late, false) as late,
      mk.id is not null as marked, mk.released_at is not null as released
    from course_memberships m
    join lab_cohorts lc on lc.cohort_id = m.cohort_id
    join labs l on l.id = lc.lab_id and l.course_id = m.course_id and l.status <> 'draft'
    ${effectiveWindowJoin({ lab: "l", member: "m", as: "w" })}
    left join drop_logs d on d.lab_id = l.id and d.membership_id = m.id
    left join drop_log_versions v on v.id = d.latest_version_id
    left join marks mk on mk.lab_id = l.id and mk.membership_id = m.id
    where m.id = ${access.membership.id}
    order by w.due_at, l.title`);
  return result.rows.map(({ marked, released, ...lab }) => ({
    ...lab,
    status: released ? "released" : marked ? "marked" : lab.version !== null ? "handed-in" : "not-handed-in",
  }));
}
