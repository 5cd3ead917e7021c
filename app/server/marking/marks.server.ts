/**
 * Changing marks: one cell from the desk, or the same change applied to many students at once. Both
 * run the one write path below: the change is checked by the rubric (`applyMarkChange`), written with
 * one upsert from a JSON recordset, and recorded in `mark_changes` with one insert, in one transaction
 * whatever the number of students. A save names the mark version it started from; when another save
 * got there first, nothing is written and the caller gets the current mark (a conflict).
 */
import { AppError } from "~/lib/app-error";
import { sql } from "drizzle-orm";
import { markChanges } from "~/db/schema";
import { suggestAutomaticCriteria, type AutoSuggestion } from "~/lib/marking/automatic-criteria";
import { MAX_BULK_STUDENTS } from "~/lib/marking/desk-filters";
import {
  applyMarkChange,
  freezeSuggestions,
  markChange as markChangeSchema,
  markTotals,
  sameContent,
  unfreezeSuggestions,
  type MarkChange,
  type MarkContent,
  type MarkState,
  type MarkTotals,
} from "~/lib/marking/marks";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import { insertMany } from "~/server/bulk-insert.server";
import type { Executor, Transaction } from "~/server/db.server";
import {
  deskRow,
  deskRowWith,
  evidenceOf,
  loadClassLabels,
  loadStudentMarkRows,
  rubricNeedsLabels,
  type ClassLabels,
  type MarkingDeskRow,
  type StoredMark,
  type StudentMarkRow,
} from "./mark-rows.server";
import { loadMarkingLab, markableCohortIds, markingRefusal, refuse, type MarkingLab } from "./marking-lab.server";

export type MarkChangeSource = "desk" | "bulk" | "moderation";

/** A single save's outcome: the saved mark and the student's recomputed desk row, or a conflict with the current ones. */
export type SaveMarkResult =
  | { status: "saved"; mark: StoredMark | null; row: MarkingDeskRow; changed: boolean }
  | { status: "conflict"; current: StoredMark | null; row: MarkingDeskRow };

/** A bulk action's outcome: how many marks changed (the others already had the value), and each student's new version and total. */
export type ApplyToManyResult = {
  changed: number;
  unchanged: number;
  marks: { membershipId: string; markId: string | null; version: number; total: number; complete: boolean }[];
};

/** Most students one bulk action may name (defined beside the desk's filters, for the page). */
export { MAX_BULK_STUDENTS };

/** The lab's marking lock: saves take it shared (they never wait for each other), marking ready and release exclusively. */
// Raw wherever it runs: an advisory lock has no query-builder form.
export const markingLock = (labId: string, mode: "shared" | "exclusive") =>
  mode === "shared"
    ? sql`select pg_advisory_xact_lock_shared(hashtextextended(${`marking:${labId}`}, 0))`
    : sql`select pg_advisory_xact_lock(hashtextextended(${`marking:${labId}`}, 0))`;

type Target = { membershipId: string; expectedVersion?: number };
type WriteRequest = {
  access: CourseAccess;
  labId: string;
  targets: Target[];
  change: unknown;
  source: MarkChangeSource;
  reason?: string | null;
  /** The caller answers with desk rows, which show the class label whether or not the rubric uses it. */
  deskRows?: boolean;
};
/** One student after the write: their row with the new mark, and the suggestions and totals it was computed with. */
type Written = { student: StudentMarkRow; suggestions: Record<string, AutoSuggestion>; totals: MarkTotals; changed: boolean };

/** Thrown inside the transaction when another save changed a mark first: rolls everything back. */
class VersionConflict extends Error {
  constructor(readonly membershipIds: string[]) {
    super("Another save changed this mark first.");
  }
}

const stateOf = (content: MarkContent, total: number, dropLogVersionId: string | null): MarkState => ({
  scores: content.scores,
  feedback: content.feedback,
  latePenaltyPoints: content.latePenaltyPoints,
  total,
  dropLogVersionId,
});

/** The one write path. Refusals are thrown as `AppError`s; the caller records the 403s. */
async function writeMarks(tx: Transaction, request: WriteRequest): Promise<{ lab: MarkingLab; labels: ClassLabels; written: Written[] }> {
  const { access, labId, targets, source } = request;
  await tx.execute(markingLock(labId, "shared"));
  const lab = await loadMarkingLab(tx, access.course.id, labId);
  if (!lab) throw markingRefusal("lab_not_found", "There is no such lab in this course.");
  const role = access.membership.role;
  if (role === "student") throw markingRefusal("forbidden", "Marking is for the course's staff.");
  if (source === "moderation" && role !== "instructor")
    throw markingRefusal("instructors_only", "Only the course's instructors moderate marks.");
  if (role === "ta" && lab.marking.readyAt)
    throw markingRefusal(
      "marking_closed",
      "The instructor has marked this lab's marking as ready: marks can no longer be changed at the desk.",
    );
  const parsed = markChangeSchema.safeParse(request.change);
  if (!parsed.success)
    throw markingRefusal(
      "invalid_value",
      parsed.error.issues[0]?.message ?? "The change cannot be read.",
      String(parsed.error.issues[0]?.path[0] ?? "form"),
    );
  const change: MarkChange = parsed.data;

  const cohortIds = markableCohortIds(access, lab);
  const membershipIds = targets.map((target) => target.membershipId);
  const [rows, labels] = await Promise.all([
    loadStudentMarkRows(tx, lab, { cohortIds, membershipIds }),
    request.deskRows || rubricNeedsLabels(lab) ? loadClassLabels(tx, lab) : Promise.resolve<ClassLabels>(new Map()),
  ]);
  const byMembership = new Map(rows.map((row) => [row.membershipId, row]));
  const outside = membershipIds.filter((id) => !byMembership.has(id));
  if (outside.length) {
    throw markingRefusal(
      "not_in_cohort",
      outside.length === 1
        ? "One of these students is not a student of your cohorts for this lab: nothing was changed."
        : `${outside.length} of these students are not students of your cohorts for this lab: nothing was changed.`,
      "membershipIds",
      outside,
    );
  }

  const reasonGiven = request.reason?.trim() || (change.kind === "score" ? change.overrideReason?.trim() : "") || "";
  const needingReason: string[] = [];
  /** `student` as the write leaves them (their mark on the counted version); `original` and `suggestionsBefore` as read. */
  type Planned = {
    student: StudentMarkRow;
    original: StudentMarkRow;
    suggestions: Record<string, AutoSuggestion>;
    suggestionsBefore: Record<string, AutoSuggestion>;
    before: MarkTotals | null;
    content: MarkContent;
    after: MarkTotals | null;
  };
  const planned: Planned[] = [];
  for (const target of targets) {
    const student = byMembership.get(target.membershipId)!;
    const mark = student.mark;
    if (target.expectedVersion !== undefined && target.expectedVersion !== (mark?.version ?? 0))
      throw new VersionConflict([target.membershipId]);
    const released = mark?.releasedAt != null;
    let content: MarkContent;
    try {
      content = applyMarkChange(lab.rubric, mark, change, { released });
    } catch (error) {
      if (error instanceof AppError) throw markingRefusal("invalid_value", error.message, error.field, [target.membershipId]);
      throw error;
    }
    // A write marks the counted version: the suggestions after it are the counted version's.
    const rebased = { ...student, markedHandIn: student.handIn };
    const suggestionsBefore = suggestAutomaticCriteria(lab.rubric, evidenceOf(lab, student, labels));
    const suggestions =
      mark && mark.basedOnVersionId !== (student.handIn?.versionId ?? null)
        ? suggestAutomaticCriteria(lab.rubric, evidenceOf(lab, rebased, labels))
        : suggestionsBefore;
    // A released mark moved onto a newer version (re-marking after a hand-in that reopened it) gets its
    // automatic criteria frozen again from that version, and is written even if nothing else changed.
    const remarking = released && suggestions !== suggestionsBefore;
    if (remarking) content = { ...content, scores: freezeSuggestions(lab.rubric, unfreezeSuggestions(content.scores), suggestions) };
    const changed = remarking || !sameContent(mark, content);
    if (changed && (released || source === "moderation") && reasonGiven.length < 3) needingReason.push(target.membershipId);
    planned.push({
      student: rebased,
      original: student,
      suggestions,
      suggestionsBefore,
      before: mark ? markTotals(lab.rubric, mark, suggestionsBefore) : null,
      content,
      after: changed ? markTotals(lab.rubric, content, suggestions) : null,
    });
  }
  if (needingReason.length) {
    throw markingRefusal(
      "reason_required",
      source === "moderation"
        ? "Say why the mark is adjusted: it is kept with the change."
        : "This mark is released: say why it changes, the student is shown the reason.",
      "reason",
      needingReason,
    );
  }

  const changes = planned.filter((entry) => entry.after !== null);
  const written = new Map<string, { id: string; version: number; updatedAt: string }>();
  if (changes.length) {
    const moderation = source === "moderation";
    const payload = changes.map(({ student, content, after }) => ({
      membership_id: student.membershipId,
      expected_version: student.mark?.version ?? 0,
      drop_log_version_id: student.handIn?.versionId ?? null,
      // The revision the marker saw: a later re-reduction of it then shows as "result changed since it was marked".
      reduction_revision: student.handIn?.revision ?? null,
      scores: content.scores,
      feedback: content.feedback,
      late_penalty_points: content.latePenaltyPoints,
      total: after!.total,
    }));
    // Raw: a bulk upsert from a JSON recordset.
    // The expected version travels as the new one (expected + 1): ON CONFLICT can compare only the proposed row's columns.
    const result = await tx.execute<{ id: string; membershipId: string; version: number; updatedAt: string }>(sql`
      insert into marks as mk (lab_id, membership_id, drop_log_version_id, reduction_revision, scores, feedback, late_penalty_points, total, version, marked_by_id, moderated_by_id, moderated_at, updated_at)
      select ${lab.id}, r.membership_id, r.drop_log_version_id, r.reduction_revision, r.scores, r.feedback, r.late_penalty_points, r.total, r.expected_version + 1,
        ${access.user.id}::uuid, ${moderation ? access.user.id : null}::uuid, ${moderation ? sql`now()` : sql`null`}, now()
      from json_to_recordset(${JSON.stringify(payload)}::json)
        as r(membership_id uuid, expected_version int, drop_log_version_id uuid, reduction_revision int, scores jsonb, feedback text, late_penalty_points float8, total float8)
      on conflict (lab_id, membership_id) do update set
        drop_log_version_id = excluded.drop_log_version_id, reduction_revision = excluded.reduction_revision, scores = excluded.scores, feedback = excluded.feedback,
        late_penalty_points = excluded.late_penalty_points, total = excluded.total, version = excluded.version, reopened_at = null,
        ${moderation ? sql`moderated_by_id = excluded.moderated_by_id, moderated_at = excluded.moderated_at,` : sql`marked_by_id = excluded.marked_by_id,`}
        updated_at = excluded.updated_at
      where mk.version = excluded.version - 1
      returning mk.id, mk.membership_id as "membershipId", mk.version, to_json(mk.updated_at)#>>'{}' as "updatedAt"`);
    for (const row of result.rows) written.set(row.membershipId, row);
    if (written.size !== changes.length)
      throw new VersionConflict(changes.map((entry) => entry.student.membershipId).filter((id) => !written.has(id)));

    await insertMany(
      tx,
      markChanges,
      changes.map(({ student, content, before, after }) => ({
        markId: written.get(student.membershipId)!.id,
        labId: lab.id,
        membershipId: student.membershipId,
        changedById: access.user.id,
        old: student.mark ? stateOf(student.mark, before!.total, student.mark.basedOnVersionId) : null,
        new: stateOf(content, after!.total, student.handIn?.versionId ?? null),
        reason: reasonGiven || null,
        source,
        afterRelease: student.mark?.releasedAt != null,
      })),
    );
    // An instructor's adjustment is a decision about a student's mark: the course's audit log keeps it too, one row per student in one statement.
    if (moderation)
      await recordAudit(
        tx,
        changes.map(({ student, before, after }) => ({
          action: "marking.mark_adjusted" as const,
          actorId: access.user.id,
          courseId: access.course.id,
          subject: `membership:${student.membershipId}`,
          detail: { labId: lab.id, fromTotal: before?.total ?? null, toTotal: after!.total, reason: reasonGiven || null },
        })),
      );
  }

  const actor = { id: access.user.id, name: access.user.name };
  return {
    lab,
    labels,
    written: planned.map(({ student, original, suggestions, suggestionsBefore, before, content, after }) => {
      if (!after)
        return {
          student: original,
          suggestions: suggestionsBefore,
          totals: before ?? markTotals(lab.rubric, null, suggestionsBefore),
          changed: false,
        };
      const stored = written.get(student.membershipId)!;
      const previous = student.mark;
      const mark: StoredMark = {
        ...content,
        id: stored.id,
        version: stored.version,
        storedTotal: after.total,
        basedOnVersionId: student.handIn?.versionId ?? null,
        basedOnRevision: student.handIn?.revision ?? null,
        basedOnFigure: student.handIn?.figure ?? null,
        markedBy: source === "moderation" ? (previous?.markedBy ?? actor) : actor,
        moderatedBy: source === "moderation" ? actor : (previous?.moderatedBy ?? null),
        moderatedAt: source === "moderation" ? stored.updatedAt : (previous?.moderatedAt ?? null),
        updatedAt: stored.updatedAt,
        releasedAt: previous?.releasedAt ?? null,
        releasedSnapshot: previous?.releasedSnapshot ?? null,
        reopenedAt: null,
      };
      return { student: { ...student, mark }, suggestions, totals: after, changed: true };
    }),
  };
}

/** Runs the write path in its own transaction (a savepoint inside a caller's), recording 403 refusals outside it so a rollback keeps them. */
async function runWrite(executor: Executor, request: WriteRequest) {
  try {
    return await executor.transaction((tx) => writeMarks(tx, request));
  } catch (error) {
    if (error instanceof AppError && error.status === 403) await refuse(executor, request.access, error, `lab:${request.labId}`);
    throw error;
  }
}

/**
 * Saves one change to one student's mark: a criterion's level or points (an automatic criterion's
 * override needs `overrideReason`), the late penalty, or the feedback. `expectedVersion` is the
 * version the editor started from (0 for a student without a mark); a different current version
 * answers `conflict` with the current mark and writes nothing. `source: "moderation"` is the
 * instructor's adjustment and needs a `reason`, as does any change to a released mark.
 */
export async function saveMark(
  executor: Executor,
  {
    access,
    labId,
    membershipId,
    change,
    expectedVersion,
    source = "desk",
    reason,
  }: {
    access: CourseAccess;
    labId: string;
    membershipId: string;
    change: MarkChange;
    expectedVersion: number;
    source?: "desk" | "moderation";
    reason?: string | null;
  },
): Promise<SaveMarkResult> {
  try {
    const { labels, written } = await runWrite(executor, {
      access,
      labId,
      targets: [{ membershipId, expectedVersion }],
      change,
      source,
      reason,
      deskRows: true,
    });
    const [{ student, suggestions, totals, changed }] = written;
    // A save that changed nothing leaves a student without a mark (clearing an empty cell) unmarked.
    return { status: "saved", mark: student.mark, row: deskRowWith(student, labels, suggestions, totals), changed };
  } catch (error) {
    if (!(error instanceof VersionConflict)) throw error;
    const lab = (await loadMarkingLab(executor, access.course.id, labId))!;
    const [[row], labels] = await Promise.all([
      loadStudentMarkRows(executor, lab, { cohortIds: markableCohortIds(access, lab), membershipIds: [membershipId] }),
      loadClassLabels(executor, lab),
    ]);
    return { status: "conflict", current: row.mark, row: deskRow(lab, row, labels) };
  }
}

/** One rubric cell from the desk: `level` for a levels criterion, `points` otherwise (`null` for both clears it). */
export function saveMarkCell(
  executor: Executor,
  {
    access,
    labId,
    membershipId,
    criterionId,
    level,
    points,
    overrideReason,
    expectedVersion,
    reason,
  }: {
    access: CourseAccess;
    labId: string;
    membershipId: string;
    criterionId: string;
    level?: number | null;
    points?: number | null;
    overrideReason?: string | null;
    expectedVersion: number;
    reason?: string | null;
  },
): Promise<SaveMarkResult> {
  return saveMark(executor, {
    access,
    labId,
    membershipId,
    expectedVersion,
    reason,
    change: { kind: "score", criterionId, level, points, overrideReason },
  });
}

/**
 * Applies one change (a level or points for a criterion, a late penalty, or the feedback) to every
 * named student in one transaction, all or nothing: a student outside the viewer's cohorts, an
 * invalid value, or a released mark without a `reason` refuses the whole batch, and a mark changed by
 * someone else meanwhile fails it with `conflict`. Marks that already have the value are left alone.
 */
export async function applyToMany(
  executor: Executor,
  {
    access,
    labId,
    membershipIds,
    change,
    reason,
    source = "bulk",
  }: {
    access: CourseAccess;
    labId: string;
    membershipIds: string[];
    change: MarkChange;
    reason?: string | null;
    source?: "bulk" | "moderation";
  },
): Promise<ApplyToManyResult> {
  const unique = [...new Set(membershipIds)];
  if (unique.length === 0) throw markingRefusal("invalid_value", "Select at least one student.", "membershipIds");
  if (unique.length > MAX_BULK_STUDENTS)
    throw markingRefusal("invalid_value", `Select at most ${MAX_BULK_STUDENTS} students at once.`, "membershipIds");
  try {
    const { written } = await runWrite(executor, {
      access,
      labId,
      targets: unique.map((membershipId) => ({ membershipId })),
      change,
      source,
      reason,
    });
    const changed = written.filter((entry) => entry.changed).length;
    return {
      changed,
      unchanged: written.length - changed,
      marks: written.map(({ student, totals }) => ({
        membershipId: student.membershipId,
        markId: student.mark?.id ?? null,
        version: student.mark?.version ?? 0,
        total: totals.total,
        complete: totals.complete,
      })),
    };
  } catch (error) {
    if (error instanceof VersionConflict) {
      throw markingRefusal(
        "conflict",
        "Someone else changed some of these marks meanwhile: nothing was changed. Reload and try again.",
        "membershipIds",
        error.membershipIds,
      );
    }
    throw error;
  }
}
