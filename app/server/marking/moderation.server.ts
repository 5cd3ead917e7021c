/**
 * Moderation and release, the instructor's side of marking: the marks of each TA side by side
 * (count, mean, spread, distribution), the lab's marking marked ready (TAs stop changing marks), and
 * release, which freezes each mark's automatic criteria, makes marks and feedback visible to students
 * and queues one e-mail per student on the same transaction. Release takes the instructor's choice
 * (`ReleaseChoice`: the fully marked students or every marked one; a zero for no hand-in or not) and
 * is refused while anyone may still hand in, extensions counted, unless the instructor says so. Adjusting a mark is `saveMark` or
 * `applyToMany` with `source: "moderation"` and a reason. Every mark change is listed for instructors.
 */
import { and, desc, eq, lt, sql } from "drizzle-orm";
import { effectiveHandInWindow, handInTiming, type ExtensionWindow, type HandInWindow } from "~/lib/drop-logs/hand-in-window";
import { alias } from "drizzle-orm/pg-core";
import { courseMemberships, labExtensions, labMarking, labs, markChanges, users } from "~/db/schema";
import { studentMarkHref } from "~/lib/marking/links";
import { freezeSuggestions, markTotals, sameContent, type MarkState, type ReleasedMarkSnapshot } from "~/lib/marking/marks";
import {
  emptyReleaseCounts,
  releaseAction,
  type AfterReleaseHandIns,
  releaseStanding,
  zeroMark,
  type ReleaseChoice,
  type ReleaseCounts,
  type ReleaseStanding,
} from "~/lib/marking/release";
import { maxTotalOf, roundPoints } from "~/lib/marking/rubric";
import { stillOpenWords } from "~/lib/marking/moderation-words";
import { insertMany } from "~/server/bulk-insert.server";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import { appUrl } from "~/server/config.server";
import type { Executor } from "~/server/db.server";
import { sendEmails } from "~/server/email/send-email.server";
import { isoText } from "~/server/sql.server";
import { suggestAutomaticCriteria } from "~/lib/marking/automatic-criteria";
import {
  deskRow,
  evidenceOf,
  loadClassLabels,
  loadStudentMarkRows,
  rubricNeedsLabels,
  type ClassLabels,
  type MarkingDeskRow,
  type StudentMarkRow,
} from "./mark-rows.server";
import { markingLock } from "./marks.server";
import { assertInstructor, loadMarkingLab, markingRefusal, type MarkingLab, type MarkingState } from "./marking-lab.server";

/** Summary statistics of a set of totals; `standardDeviation` is the sample one (n − 1), null below two marks. */
export type TotalsSummary = {
  count: number;
  mean: number | null;
  standardDeviation: number | null;
  median: number | null;
  min: number | null;
  max: number | null;
  /** Counts per bin of `Moderation.bins`. */
  histogram: number[];
};

export type Moderation = {
  lab: MarkingLab;
  maxTotal: number;
  /** Equal-width bins over 0 … maxTotal, the last one closed; shared by every histogram so they compare. */
  bins: { from: number; to: number }[];
  /** One entry per TA (or instructor) who last marked at the desk, by name; `marker` null for marks whose marker's account is gone. */
  markers: ({ marker: { id: string; name: string } | null } & TotalsSummary)[];
  overall: TotalsSummary;
  students: number;
  /** Students by where their mark stands. */
  progress: { unmarked: number; partial: number; marked: number };
  released: number;
  /** Released marks that differ from what was released. */
  changedAfterRelease: number;
  /** Released marks reopened by a hand-in after release, waiting to be marked again. */
  needsRemarking: number;
  /** Marks whose hand-in was re-reduced (a part correction) since they were marked; released ones need the instructor's review. */
  resultChanged: {
    membershipId: string;
    name: string;
    oldFigure: number | null;
    newFigure: number | null;
    released: boolean;
    reoffered: number;
  }[];
  /** Every student's row (all cohorts), for adjusting: the desk's own rows. */
  rows: MarkingDeskRow[];
  /** What a release would find now: the counts its choices act on, and who may still hand in. */
  release: ReleasePreview;
};

export type ReleasePreview = {
  /** Students by where they stand for release. */
  counts: ReleaseCounts;
  /** Students who may still hand in (their own cut-off, or due time without one, extensions counted, is ahead), and the last such time. */
  stillOpen: { students: number; until: string | null };
  /** What the lab does with a hand-in from a student whose mark is released. */
  afterReleaseHandIns: AfterReleaseHandIns;
};

/** The lab's times, status and after-release policy, and every extension of it. */
type HandInWindows = {
  status: "draft" | "published" | "closed";
  afterReleaseHandIns: AfterReleaseHandIns;
  lab: HandInWindow;
  byStudent: Map<string, ExtensionWindow>;
  byCohort: Map<string, ExtensionWindow>;
};

/** The lab's hand-in windows, extensions included: one statement. */
async function loadHandInWindows(executor: Executor, labId: string): Promise<HandInWindows> {
  type Extension = { membershipId: string | null; cohortId: string | null; dueAt: string; lateCutoffAt: string | null };
  const extensions = executor
    .select({
      list: sql<
        Extension[]
      >`coalesce(json_agg(json_build_object('membershipId', ${labExtensions.membershipId}, 'cohortId', ${labExtensions.cohortId},
        'dueAt', ${labExtensions.dueAt}, 'lateCutoffAt', ${labExtensions.lateCutoffAt})), '[]'::json)`,
    })
    .from(labExtensions)
    .where(eq(labExtensions.labId, labs.id));
  const [row] = await executor
    .select({
      status: labs.status,
      policy: labs.afterReleaseHandIns,
      opensAt: isoText(labs.opensAt),
      dueAt: isoText(labs.dueAt),
      lateCutoffAt: isoText(labs.lateCutoffAt),
      extensions: sql<Extension[]>`${extensions}`,
    })
    .from(labs)
    .where(eq(labs.id, labId));
  const windowOf = (extension: Extension): ExtensionWindow => ({
    dueAt: new Date(extension.dueAt),
    lateCutoffAt: extension.lateCutoffAt ? new Date(extension.lateCutoffAt) : null,
  });
  return {
    status: row.status,
    afterReleaseHandIns: row.policy,
    lab: { opensAt: new Date(row.opensAt), dueAt: new Date(row.dueAt), lateCutoffAt: row.lateCutoffAt ? new Date(row.lateCutoffAt) : null },
    byStudent: new Map(
      row.extensions.filter((extension) => extension.membershipId).map((extension) => [extension.membershipId!, windowOf(extension)]),
    ),
    byCohort: new Map(
      row.extensions.filter((extension) => extension.cohortId).map((extension) => [extension.cohortId!, windowOf(extension)]),
    ),
  };
}

/** When the student's own window closes, or null when the lab takes no more hand-ins from them. */
function stillOpenUntil(windows: HandInWindows, student: Pick<StudentMarkRow, "membershipId" | "cohortId">, now: Date): Date | null {
  if (windows.status !== "published") return null;
  const window = effectiveHandInWindow(windows.lab, {
    student: windows.byStudent.get(student.membershipId),
    cohort: windows.byCohort.get(student.cohortId),
  });
  return handInTiming(window, now) === "closed" ? null : (window.lateCutoffAt ?? window.dueAt);
}

/** Each student's standing for release, and who may still hand in. */
function previewRelease(
  rows: MarkingDeskRow[],
  windows: HandInWindows,
  now: Date,
): { preview: ReleasePreview; standings: Map<string, ReleaseStanding> } {
  const counts = emptyReleaseCounts();
  const standings = new Map<string, ReleaseStanding>();
  let stillOpen = 0;
  let until: Date | null = null;
  for (const row of rows) {
    const open = stillOpenUntil(windows, row, now);
    if (open) {
      stillOpen++;
      if (!until || open > until) until = open;
    }
    const standing = releaseStanding({
      handedIn: row.handIn !== null,
      stillOpen: open !== null,
      mark: row.mark && { released: row.mark.releasedAt !== null, complete: row.complete, onCountedVersion: !row.handInChangedSinceMarked },
    });
    counts[standing]++;
    standings.set(row.membershipId, standing);
  }
  return {
    preview: {
      counts,
      stillOpen: { students: stillOpen, until: until?.toISOString() ?? null },
      afterReleaseHandIns: windows.afterReleaseHandIns,
    },
    standings,
  };
}

function summarise(totals: number[], bins: { from: number; to: number }[]): TotalsSummary {
  const histogram = bins.map(() => 0);
  const width = bins.length ? bins[0].to - bins[0].from : 0;
  for (const total of totals) {
    if (width <= 0) continue;
    histogram[Math.min(bins.length - 1, Math.max(0, Math.floor(total / width)))]++;
  }
  const count = totals.length;
  if (count === 0) return { count, mean: null, standardDeviation: null, median: null, min: null, max: null, histogram };
  const sorted = [...totals].sort((a, b) => a - b);
  const mean = totals.reduce((sum, value) => sum + value, 0) / count;
  const variance = count > 1 ? totals.reduce((sum, value) => sum + (value - mean) ** 2, 0) / (count - 1) : null;
  const median = count % 2 ? sorted[(count - 1) / 2] : (sorted[count / 2 - 1] + sorted[count / 2]) / 2;
  return {
    count,
    mean,
    standardDeviation: variance === null ? null : Math.sqrt(variance),
    median,
    min: sorted[0],
    max: sorted[count - 1],
    histogram,
  };
}

/** Equal-width bins over 0 … max. */
export function totalBins(maxTotal: number, count = 10): { from: number; to: number }[] {
  if (maxTotal <= 0) return [];
  const width = maxTotal / count;
  return Array.from({ length: count }, (_, index) => ({ from: roundPoints(index * width), to: roundPoints((index + 1) * width) }));
}

const loadLabelsFor = (executor: Executor, lab: MarkingLab): Promise<ClassLabels> =>
  rubricNeedsLabels(lab) ? loadClassLabels(executor, lab) : Promise.resolve(new Map());

/**
 * The moderation view of a lab, for instructors: each marker's totals (the marks they last marked
 * at the desk, whatever moderation changed since) beside everyone's, and what a release would find.
 * Three statements.
 */
export async function loadModeration(
  executor: Executor,
  { access, lab, binCount = 10, now = new Date() }: { access: CourseAccess; lab: MarkingLab; binCount?: number; now?: Date },
): Promise<Moderation> {
  await assertInstructor(executor, access, lab);
  const [students, labels, windows] = await Promise.all([
    loadStudentMarkRows(executor, lab, { cohortIds: lab.cohortIds }),
    loadClassLabels(executor, lab),
    loadHandInWindows(executor, lab.id),
  ]);
  const rows = students.map((student) => deskRow(lab, student, labels));
  const maxTotal = maxTotalOf(lab.rubric);
  const bins = totalBins(maxTotal, binCount);
  const marked = rows.filter((row) => row.mark !== null);
  const byMarker = new Map<string, { marker: { id: string; name: string } | null; totals: number[] }>();
  for (const row of marked) {
    const key = row.mark!.markedBy?.id ?? "";
    const entry = byMarker.get(key) ?? { marker: row.mark!.markedBy, totals: [] };
    entry.totals.push(row.total);
    byMarker.set(key, entry);
  }
  const progress = { unmarked: 0, partial: 0, marked: 0 };
  for (const row of rows) progress[row.progress]++;
  const released = marked.filter((row) => row.mark!.releasedAt !== null);
  return {
    lab,
    maxTotal,
    bins,
    markers: [...byMarker.values()]
      .map(({ marker, totals }) => ({ marker, ...summarise(totals, bins) }))
      .sort((a, b) => (a.marker?.name ?? "\uffff").localeCompare(b.marker?.name ?? "\uffff")),
    overall: summarise(
      marked.map((row) => row.total),
      bins,
    ),
    students: rows.length,
    progress,
    released: released.length,
    changedAfterRelease: released.filter((row) => row.mark!.releasedSnapshot && !sameContent(row.mark!.releasedSnapshot, row.mark!)).length,
    needsRemarking: rows.filter((row) => row.needsRemarking).length,
    resultChanged: rows.flatMap((row) => {
      const changed = row.resultChangedSinceMarked;
      if (!changed) return [];
      const { oldFigure, newFigure, reofferedCriterionIds } = changed;
      return [
        {
          membershipId: row.membershipId,
          name: row.studentName,
          oldFigure,
          newFigure,
          released: row.mark!.releasedAt !== null,
          reoffered: reofferedCriterionIds.length,
        },
      ];
    }),
    rows,
    release: previewRelease(rows, windows, now).preview,
  };
}

/**
 * Marks the lab's marking ready (TAs can no longer change marks at the desk), or opens it again with
 * `ready: false`. Instructors only.
 */
export async function markLabReady(
  executor: Executor,
  { access, lab, ready = true, request }: { access: CourseAccess; lab: Pick<MarkingLab, "id">; ready?: boolean; request?: Request },
): Promise<MarkingState> {
  await assertInstructor(executor, access, lab);
  return executor.transaction(async (tx) => {
    // Exclusive: saves already under way finish first, and none starts until this commits.
    await tx.execute(markingLock(lab.id, "exclusive"));
    const readyAt = ready ? new Date() : null;
    await tx
      .insert(labMarking)
      .values({ labId: lab.id, readyAt, readyById: ready ? access.user.id : null })
      .onConflictDoUpdate({ target: labMarking.labId, set: { readyAt, readyById: ready ? access.user.id : null, updatedAt: new Date() } });
    await recordAudit(tx, {
      action: ready ? "marking.ready" : "marking.reopened",
      actorId: access.user.id,
      courseId: access.course.id,
      subject: `lab:${lab.id}`,
      request,
    });
    return (await loadMarkingLab(tx, access.course.id, lab.id))!.marking;
  });
}

export type ReleaseOutcome = {
  /** Marks shown to students by this release, zeros included. */
  released: number;
  /** Of those, zeros written for students who handed in nothing. */
  zeros: number;
  /** E-mails queued (a student already e-mailed for this lab is not e-mailed again). */
  emailed: number;
  /** Marks released before. */
  alreadyReleased: number;
  /** Students this choice left unreleased (not marked, partly marked, no hand-in, or still able to hand in): they see nothing yet. */
  withheld: number;
  /** Students who may still hand in, extensions counted. */
  stillOpen: number;
};

const zeroReason = "Released as zero: nothing was handed in.";

/**
 * Releases the lab's marks as the instructor chose: each released mark gets its automatic criteria
 * frozen from the version it was marked on, its total written and a snapshot of what the student
 * now sees; with `zeroForNoHandIn`, a student whose window closed with nothing handed in gets a zero
 * mark (recorded in the mark history). Each student released is e-mailed ("marks-released", with a
 * dedupe key per lab and student) on the same transaction. Releasing again shows only the marks added
 * since, and e-mails nobody twice. Refused (`still_open`) while anyone may still hand in, extensions
 * counted, unless `whileOpen`. Instructors only, once the marking is marked ready. One transaction
 * whatever the class size.
 */
export async function releaseMarks(
  executor: Executor,
  {
    access,
    lab: { id: labId },
    choice,
    request,
    now = new Date(),
  }: { access: CourseAccess; lab: Pick<MarkingLab, "id">; choice: ReleaseChoice; request?: Request; now?: Date },
): Promise<ReleaseOutcome> {
  await assertInstructor(executor, access, { id: labId });
  return executor.transaction(async (tx) => {
    await tx.execute(markingLock(labId, "exclusive"));
    const lab = await loadMarkingLab(tx, access.course.id, labId);
    if (!lab) throw markingRefusal("lab_not_found", "There is no such lab in this course.");
    if (!lab.marking.readyAt) throw markingRefusal("not_ready", "Mark the lab's marking as ready before releasing it.");
    const [students, labels, windows] = await Promise.all([
      loadStudentMarkRows(tx, lab, { cohortIds: lab.cohortIds }),
      loadLabelsFor(tx, lab),
      loadHandInWindows(tx, labId),
    ]);
    const rows = students.map((student) => deskRow(lab, student, labels));
    const { preview, standings } = previewRelease(rows, windows, now);
    if (preview.stillOpen.students > 0 && !choice.whileOpen) {
      throw markingRefusal(
        "still_open",
        `${stillOpenWords(preview.stillOpen.students)}. Confirm that you release while hand-ins are still possible.`,
        "whileOpen",
      );
    }
    const actions = students.map((row) => ({ row, action: releaseAction(standings.get(row.membershipId)!, row.mark !== null, choice) }));
    const toRelease = actions.filter((entry) => entry.action === "mark").map((entry) => entry.row);
    const toZero = actions.filter((entry) => entry.action === "zero").map((entry) => entry.row);
    const releasedAt = now.toISOString();
    const payload = toRelease.map((row) => {
      const mark = row.mark!;
      const suggestions = suggestAutomaticCriteria(lab.rubric, evidenceOf(lab, row, labels));
      const scores = freezeSuggestions(lab.rubric, mark.scores, suggestions);
      const total = markTotals(lab.rubric, { scores, latePenaltyPoints: mark.latePenaltyPoints }, suggestions).total;
      // The mark is released on the version it was marked on, never a later one.
      const snapshot: ReleasedMarkSnapshot = {
        scores,
        feedback: mark.feedback,
        latePenaltyPoints: mark.latePenaltyPoints,
        total,
        dropLogVersionId: mark.basedOnVersionId,
        releasedAt,
      };
      return { id: mark.id, version: mark.version, scores, total, snapshot };
    });
    if (payload.length) {
      // The version is unchanged: release writes in what was already shown, it changes no value.
      // Raw: a bulk update from a JSON recordset.
      const result = await tx.execute(sql`
        update marks mk set scores = r.scores, total = r.total, released_at = ${releasedAt}::timestamptz, released_snapshot = r.snapshot
        from json_to_recordset(${JSON.stringify(payload)}::json) as r(id uuid, version int, scores jsonb, total float8, snapshot jsonb)
        where mk.id = r.id and mk.version = r.version and mk.released_at is null`);
      if ((result.rowCount ?? 0) !== payload.length)
        throw markingRefusal("conflict", "Marks changed while releasing: nothing was released. Try again.");
    }
    if (toZero.length) {
      const zero = zeroMark(lab.rubric);
      const state: MarkState = { ...zero, total: 0, dropLogVersionId: null };
      const snapshot: ReleasedMarkSnapshot = { ...state, releasedAt };
      // Saves wait for the exclusive lock, so no mark can appear meanwhile; a missing row is still checked.
      // Raw: a bulk insert from a JSON recordset.
      const created = await tx.execute<{ id: string; membershipId: string }>(sql`
        insert into marks (lab_id, membership_id, scores, feedback, late_penalty_points, total, version, marked_by_id, moderated_by_id, moderated_at, released_at, released_snapshot, updated_at)
        select ${lab.id}, r.membership_id, ${JSON.stringify(zero.scores)}::jsonb, ${zero.feedback}, 0, 0, 1, ${access.user.id}::uuid, ${access.user.id}::uuid,
          ${releasedAt}::timestamptz, ${releasedAt}::timestamptz, ${JSON.stringify(snapshot)}::jsonb, ${releasedAt}::timestamptz
        from json_to_recordset(${JSON.stringify(toZero.map((row) => ({ membership_id: row.membershipId })))}::json) as r(membership_id uuid)
        on conflict (lab_id, membership_id) do nothing
        returning id, membership_id as "membershipId"`);
      if (created.rows.length !== toZero.length)
        throw markingRefusal("conflict", "Marks changed while releasing: nothing was released. Try again.");
      await insertMany(
        tx,
        markChanges,
        created.rows.map((mark) => ({
          markId: mark.id,
          labId: lab.id,
          membershipId: mark.membershipId,
          changedById: access.user.id,
          changedAt: now,
          old: null,
          new: state,
          reason: zeroReason,
          source: "moderation" as const,
        })),
      );
    }
    await tx
      .insert(labMarking)
      .values({ labId, releasedAt: now, releasedById: access.user.id })
      .onConflictDoUpdate({ target: labMarking.labId, set: { releasedAt: now, releasedById: access.user.id, updatedAt: now } });
    const marksUrl = `${appUrl()}${studentMarkHref(lab.courseId, lab.id)}`;
    const sent = await sendEmails(
      tx,
      [...toRelease, ...toZero].map((row) => ({
        to: row.email,
        toName: row.studentName,
        template: "marks-released" as const,
        props: { courseTitle: access.course.title, labTitle: lab.title, marksUrl },
        courseId: lab.courseId,
        dedupeKey: `marks-released:${lab.id}:${row.membershipId}`,
      })),
    );
    const alreadyReleased = preview.counts.released;
    const outcome: ReleaseOutcome = {
      released: toRelease.length + toZero.length,
      zeros: toZero.length,
      emailed: sent.filter((entry) => !entry.duplicate && !entry.refused).length,
      alreadyReleased,
      withheld: students.length - alreadyReleased - toRelease.length - toZero.length,
      stillOpen: preview.stillOpen.students,
    };
    await recordAudit(tx, {
      action: "marking.released",
      actorId: access.user.id,
      courseId: access.course.id,
      subject: `lab:${lab.id}`,
      detail: { ...outcome, choice },
      request,
    });
    return outcome;
  });
}

/** One change of a mark, for the instructors' history. */
export type MarkChangeEntry = {
  id: string;
  markId: string;
  membershipId: string;
  studentName: string;
  changedBy: { id: string; name: string } | null;
  changedAt: Date;
  source: "desk" | "bulk" | "moderation";
  reason: string | null;
  old: MarkState | null;
  new: MarkState;
  afterRelease: boolean;
};

/**
 * Every change of the lab's marks, newest first (or one student's with `membershipId`), `limit` at a
 * time; `before` pages on from the oldest entry shown. Instructors only. One statement.
 */
export async function listMarkChanges(
  executor: Executor,
  {
    access,
    labId,
    membershipId,
    limit = 200,
    before,
  }: { access: CourseAccess; labId: string; membershipId?: string; limit?: number; before?: Date },
): Promise<MarkChangeEntry[]> {
  await assertInstructor(executor, access, { id: labId });
  const changer = alias(users, "changer");
  const rows = await executor
    .select({
      id: markChanges.id,
      markId: markChanges.markId,
      membershipId: markChanges.membershipId,
      studentName: users.name,
      changedById: markChanges.changedById,
      changedByName: changer.name,
      changedAt: markChanges.changedAt,
      source: markChanges.source,
      reason: markChanges.reason,
      old: markChanges.old,
      new: markChanges.new,
      afterRelease: markChanges.afterRelease,
    })
    .from(markChanges)
    .innerJoin(courseMemberships, eq(courseMemberships.id, markChanges.membershipId))
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(changer, eq(changer.id, markChanges.changedById))
    .where(
      and(
        eq(markChanges.labId, labId),
        eq(courseMemberships.courseId, access.course.id),
        membershipId ? eq(markChanges.membershipId, membershipId) : undefined,
        before ? lt(markChanges.changedAt, before) : undefined,
      ),
    )
    .orderBy(desc(markChanges.changedAt), desc(markChanges.id))
    .limit(Math.min(Math.max(1, limit), 1000));
  return rows.map(({ changedById, changedByName, ...row }) => ({
    ...row,
    changedBy: changedById ? { id: changedById, name: changedByName ?? "" } : null,
  }));
}
