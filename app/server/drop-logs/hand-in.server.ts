/**
 * A student's drop log for a lab: the draft saved as they type, the live preview, and the hand-in,
 * which recomputes the reduction on the server and stores it as a new immutable version. A hand-in
 * locks only the student's own drop_logs row, so a whole class handing in at the deadline does not
 * queue behind one lock (it also holds the lab's marking lock shared, which only a release, taking
 * it exclusively, waits for: a hand-in then sees whether that release covered the student's mark).
 */
import { randomUUID } from "node:crypto";
import { AppError, type ErrorIssue } from "~/lib/app-error";
import { and, asc, desc, eq, getTableColumns, sql, type SQLWrapper } from "drizzle-orm";
import { z } from "zod";
import { courses, dropLogPhotos, dropLogs, dropLogVersions, kitParts, kits, labs, parts } from "~/db/schema";
import { dropLogDraft, dropLogInput, type DropLogInput } from "~/lib/drop-logs/drop-log-input";
import { effectiveHandInWindow, handInTiming, type HandInWindow } from "~/lib/drop-logs/hand-in-window";
import { reduceDropLog, type DropLogReduction, type KitRecordsInput } from "~/lib/drop-logs/reduce-drop-log";
import type { AllowedPartKind } from "~/lib/labs/lab-input";
import { ReductionInputError } from "~/lib/reduction";
import type { CourseAccess } from "~/server/auth/access.server";
import { classComparisonRequest, comparisonLabColumns } from "~/server/comparison/class-comparison.server";
import { appUrl } from "~/server/config.server";
import type { Executor } from "~/server/db.server";
import { outboxEntry } from "~/server/email/send-email.server";
import { jobsInsert } from "~/server/jobs/boss.server";
import { jsonRows } from "~/server/json-rows.server";
import { labRefusal } from "~/server/labs/lab-access.server";
import { markingLock } from "~/server/marking/marks.server";
import { executePrepared, statementName } from "~/server/prepared-statements.server";
import { isEntityId } from "~/lib/forms/ids";

export type HandInRefusalCode =
  | "invalid_input"
  | "not_reducible"
  | "not_a_student"
  | "lab_not_found"
  | "lab_closed"
  | "not_in_cohort"
  | "no_kit"
  | "sphere_not_in_kit"
  | "part_not_in_kit"
  | "part_not_allowed"
  | "part_not_chosen"
  | "kit_incomplete"
  | "not_open"
  | "past_cutoff"
  | "mark_released";

const refusalStatus: Record<HandInRefusalCode, number> = {
  invalid_input: 400,
  not_reducible: 400,
  not_a_student: 403,
  lab_not_found: 404,
  lab_closed: 409,
  not_in_cohort: 403,
  no_kit: 409,
  sphere_not_in_kit: 400,
  part_not_in_kit: 400,
  part_not_allowed: 400,
  part_not_chosen: 400,
  kit_incomplete: 409,
  not_open: 409,
  past_cutoff: 409,
  mark_released: 409,
};

/**
 * A hand-in (or preview, or draft) the server will not take; the message tells the student what to do,
 * and `issues` the fields at fault (`["drops", 3]`).
 */
export function handInRefusal(code: HandInRefusalCode, message: string, issues: ErrorIssue[] = []): AppError {
  return new AppError({ code, message, status: refusalStatus[code], issues });
}

/** An extension as json_build_object returns it: timestamps arrive as strings. */
type ExtensionRow = { dueAt: string; lateCutoffAt: string | null };
const extensionWindow = (row: ExtensionRow | null) =>
  row ? { dueAt: new Date(row.dueAt), lateCutoffAt: row.lateCutoffAt ? new Date(row.lateCutoffAt) : null } : null;

export type StudentLab = Awaited<ReturnType<typeof loadStudentLab>>;

/** Whether the student's mark for the lab is released: read inside the statements a hand-in runs anyway. */
const markReleased = (labId: SQLWrapper | string, membershipId: string) =>
  sql<boolean>`exists (select 1 from marks mk where mk.lab_id = ${labId} and mk.membership_id = ${membershipId} and mk.released_at is not null)`;

export const markReleasedMessage =
  "Your mark for this lab is released: it takes no more hand-ins from you. Ask your instructor if something went wrong.";
export type KitPart = StudentLab["kitParts"][number];

/** How the form and the messages name each kind of part a hand-in is reduced against (the kinds a lab limits). */
type ChoosableKind = AllowedPartKind;
const partWords: Record<ChoosableKind, { name: string; field: "sphereId" | "fluidLotId" | "columnId" }> = {
  sphere: { name: "sphere", field: "sphereId" },
  fluid_lot: { name: "fluid lot", field: "fluidLotId" },
  column: { name: "column", field: "columnId" },
};

/**
 * The lab as a student sees it, whether they may hand in to it, and the parts of the kit they hold:
 * two statements, run side by side. Unpublished labs and labs of other cohorts are refused.
 * `usableParts` are the kit's parts the lab allows: per kind, the ones it ticked, or every part of
 * that kind in the kit when it ticked none of that kind.
 */
export async function loadStudentLab(executor: Executor, access: CourseAccess, labId: string) {
  if (access.membership.role !== "student") throw handInRefusal("not_a_student", "Only students hand in drop logs.");
  if (!isEntityId(labId)) throw handInRefusal("lab_not_found", "There is no such lab in this course.");
  const [labRows, kitPartRows] = await Promise.all([
    executor
      .select({
        lab: labs,
        gravity: courses.localGravity,
        cohortIds: comparisonLabColumns.cohortIds,
        // Which kinds the lab limits: a kind with no ticked part allows any of that kind in the kit.
        limitedKinds: sql<ChoosableKind[]>`array(select distinct p.kind from parts p where p.id = any(${labs.allowedPartIds}))::text[]`,
        markReleased: markReleased(labs.id, access.membership.id),
        // The student's own extension and their cohort's, read in this statement so a hand-in costs no more queries.
        studentExtension: sql<ExtensionRow | null>`(select json_build_object('dueAt', le.due_at, 'lateCutoffAt', le.late_cutoff_at) from lab_extensions le where le.lab_id = ${labs.id} and le.membership_id = ${access.membership.id})`,
        cohortExtension: sql<ExtensionRow | null>`(select json_build_object('dueAt', le.due_at, 'lateCutoffAt', le.late_cutoff_at) from lab_extensions le where le.lab_id = ${labs.id} and le.cohort_id = ${access.membership.cohortId})`,
      })
      .from(labs)
      .innerJoin(courses, eq(courses.id, labs.courseId))
      .where(and(eq(labs.id, labId), eq(labs.courseId, access.course.id)))
      .prepare(statementName("student_lab"))
      .execute(),
    executor
      .select({
        id: parts.id,
        kind: parts.kind,
        label: parts.label,
        material: parts.material,
        diameterMm: parts.diameterMm,
        diameterResolutionMm: parts.diameterResolutionMm,
        massG: parts.massG,
        massResolutionG: parts.massResolutionG,
        fluidName: parts.fluidName,
        densityKgM3: parts.densityKgM3,
        densityUncertaintyKgM3: parts.densityUncertaintyKgM3,
        densityTemperatureCoefficientKgM3K: parts.densityTemperatureCoefficientKgM3K,
        calibration: parts.calibration,
        innerDiameterMm: parts.innerDiameterMm,
        innerDiameterUncertaintyMm: parts.innerDiameterUncertaintyMm,
        timedDistanceMm: parts.timedDistanceMm,
        runInMm: parts.runInMm,
        marginBelowMm: parts.marginBelowMm,
        kitNumber: kits.number,
        kitState: kits.state,
      })
      .from(kits)
      .innerJoin(kitParts, eq(kitParts.kitId, kits.id))
      .innerJoin(parts, eq(parts.id, kitParts.partId))
      .where(eq(kits.holderMembershipId, access.membership.id))
      .orderBy(asc(parts.label))
      .prepare(statementName("student_kit_parts"))
      .execute(),
  ]);
  const row = labRows[0];
  // The same rule as every lab page's: a draft lab answers like a lab that does not exist.
  const refusal = row ? labRefusal(access, { ...row.lab, cohortIds: row.cohortIds }) : "no_such_lab";
  if (!row || refusal === "no_such_lab") throw handInRefusal("lab_not_found", "There is no such lab in this course.");
  if (refusal === "not_in_cohort") throw handInRefusal("not_in_cohort", "This lab is not set for your cohort.");
  const allowed = new Set(row.lab.allowedPartIds);
  const limited = new Set(row.limitedKinds);
  // A shared part (a fluid lot) in two kits the student holds is one choice, not two.
  const seen = new Set<string>();
  const usable = kitPartRows.filter((part) => {
    if (seen.has(part.id)) return false;
    seen.add(part.id);
    return !limited.has(part.kind as ChoosableKind) || allowed.has(part.id);
  });
  // The lab's policy decides what a hand-in after release does; the page says so before the student tries.
  const afterRelease = row.markReleased ? row.lab.afterReleaseHandIns : null;
  // The student's effective window decides late and cut-off: their extension, else their cohort's, else the lab's.
  const handInWindow = effectiveHandInWindow(row.lab, {
    student: extensionWindow(row.studentExtension),
    cohort: extensionWindow(row.cohortExtension),
  });
  return { lab: row.lab, window: handInWindow, gravity: row.gravity, kitParts: kitPartRows, usableParts: usable, afterRelease };
}

/**
 * The part of one kind a drop log was measured with: the one the student named, which must be in their
 * kit and allowed by the lab, or, when they named none, the only one the lab allows in their kit.
 * With two or more to choose from the choice is the student's, never the first by label.
 */
function choosePart(context: StudentLab, kind: ChoosableKind, chosenId: string | undefined): KitPart {
  const { name, field } = partWords[kind];
  const candidates = context.usableParts.filter((part) => part.kind === kind);
  if (chosenId !== undefined) {
    const part = context.kitParts.find((candidate) => candidate.id === chosenId && candidate.kind === kind);
    if (!part) {
      throw handInRefusal(kind === "sphere" ? "sphere_not_in_kit" : "part_not_in_kit", `Choose a ${name} of your own kit.`, [
        { path: [field], message: `That ${name} is not in your kit.` },
      ]);
    }
    if (!candidates.some((candidate) => candidate.id === part.id)) {
      throw handInRefusal("part_not_allowed", `This lab does not use ${name} ${part.label}.`, [
        {
          path: [field],
          message: `This lab does not use ${name} ${part.label}; choose ${candidates.length ? `one of ${candidates.map((candidate) => candidate.label).join(", ")}` : "another"}.`,
        },
      ]);
    }
    return part;
  }
  if (candidates.length === 1) return candidates[0];
  if (candidates.length === 0) throw handInRefusal("kit_incomplete", `Your kit has no ${name} this lab can use; report it from “My kit”.`);
  throw handInRefusal("part_not_chosen", `Choose the ${name} you used: your kit holds ${candidates.length} this lab allows.`, [
    { path: [field], message: `Choose which ${name} you used: ${candidates.map((part) => part.label).join(", ")}.` },
  ]);
}

/** The sphere, fluid lot and column of the student's kit the drop log names (or the lab's only choice), and the kit's state. */
function resolveKit(context: StudentLab, input: DropLogInput): KitRecordsInput {
  if (context.kitParts.length === 0)
    throw handInRefusal("no_kit", "You hold no kit in this course yet, so there is nothing to reduce against.");
  const sphere = choosePart(context, "sphere", input.sphereId);
  const fluidLot = choosePart(context, "fluid_lot", input.fluidLotId);
  const column = choosePart(context, "column", input.columnId);
  return { sphere, fluidLot, column, kit: { number: sphere.kitNumber, state: sphere.kitState } };
}

function parseInput(raw: unknown): DropLogInput {
  const parsed = dropLogInput.safeParse(raw);
  if (parsed.success) return parsed.data;
  throw handInRefusal(
    "invalid_input",
    "Some of the drop log needs correcting.",
    parsed.error.issues.map((issue) => ({
      path: issue.path.map((key) => (typeof key === "symbol" ? String(key) : key)),
      message: issue.message,
    })),
  );
}

function reduceFor(context: StudentLab, input: DropLogInput): DropLogReduction {
  const kit = resolveKit(context, input);
  try {
    return reduceDropLog({ lab: context.lab, kit, input, gravity: context.gravity });
  } catch (error) {
    if (!(error instanceof ReductionInputError)) throw error;
    throw handInRefusal(
      "not_reducible",
      "These values cannot be reduced.",
      error.issues.map((issue) => ({ path: issue.path.split("."), message: issue.message })),
    );
  }
}

/** The live preview: the same reduction a hand-in stores, without storing anything. */
export async function previewDropLog(
  executor: Executor,
  { access, labId, input }: { access: CourseAccess; labId: string; input: unknown },
) {
  const parsed = parseInput(input);
  const context = await loadStudentLab(executor, access, labId);
  return reduceFor(context, parsed);
}

const labClosed = () => handInRefusal("lab_closed", "This lab is closed: it takes no more hand-ins.");
const pastCutoff = (window: HandInWindow) =>
  handInRefusal(
    "past_cutoff",
    window.lateCutoffAt
      ? "The late cut-off has passed: this lab takes no more hand-ins."
      : "The due time has passed and this lab takes no late hand-ins.",
  );

/**
 * Refuses when the lab takes no more hand-ins from this student: closed, past their own cut-off, or
 * their mark released under a lab that refuses hand-ins after release. Photos for the next hand-in
 * are refused then too. A lab not open yet is not refused: its draft may be prepared, photos included.
 */
export function refuseWhenClosed(context: StudentLab, now: Date): void {
  if (context.lab.status !== "published") throw labClosed();
  if (handInTiming(context.window, now) === "closed") throw pastCutoff(context.window);
  if (context.afterRelease === "refuse") throw handInRefusal("mark_released", markReleasedMessage);
}

export type HandInResult = { version: { id: string; version: number; late: boolean; submittedAt: Date }; duplicate: boolean };

const idempotencyKey = z.string().trim().min(8, "The hand-in key is missing; reload the page.").max(200);

/**
 * Hands in a drop log: checks it, recomputes it, and stores it as the next version of the student's
 * drop log, with the photos attached to the draft, in one transaction. The same idempotency key again
 * (a double tap, a retry after a dropped connection) returns the version already stored.
 */
export async function handInDropLog(
  executor: Executor,
  {
    access,
    labId,
    input,
    idempotencyKey: key,
    now = new Date(),
  }: { access: CourseAccess; labId: string; input: unknown; idempotencyKey: string; now?: Date },
): Promise<HandInResult> {
  const keyCheck = idempotencyKey.safeParse(key);
  if (!keyCheck.success) throw handInRefusal("invalid_input", keyCheck.error.issues[0].message);
  const parsed = parseInput(input);
  const context = await loadStudentLab(executor, access, labId);
  const lab = context.lab;
  if (lab.status !== "published") throw labClosed();
  const { reduction, kitRecords, normalisedFigure, warnings } = reduceFor(context, parsed);
  const warningCount = warnings.filter((warning) => warning.level !== "info").length;
  const handInWindow = context.window;
  const timing = handInTiming(handInWindow, now);
  return executor.transaction(async (tx) => {
    // The only row a hand-in locks: this student's own drop log, which the upsert creates or locks (as
    // ON CONFLICT DO UPDATE does) in one statement. Versions are numbered under it. The same statement
    // takes the lab's marking lock, shared (hand-ins never wait for each other): a release under way
    // finishes first, so the next statement sees whether it released this mark.
    const [dropLog] = await tx
      .insert(dropLogs)
      .values({ labId, membershipId: access.membership.id })
      .onConflictDoUpdate({ target: [dropLogs.labId, dropLogs.membershipId], set: { labId: sql`excluded.lab_id` } })
      .returning({
        id: dropLogs.id,
        marking: sql`(${markingLock(labId, "shared")}) is null`,
        // The locked row as it is now, which the statement's snapshot (taken before the lock) may predate.
        latestVersionId: dropLogs.latestVersionId,
        ...storedVersions(keyCheck.data),
      })
      .prepare(statementName("hand_in_lock_drop_log"))
      .execute();
    // Every version is stored with its drop log's pointer to it, under the lock: when the snapshot's newest
    // version is the row's, the snapshot holds them all. Otherwise a hand-in committed while this one
    // waited for the lock (a double tap with two keys), and a new statement sees it.
    const stored =
      dropLog.seenLatestVersionId === dropLog.latestVersionId
        ? dropLog
        : (await tx.select(storedVersions(keyCheck.data)).from(dropLogs).where(eq(dropLogs.id, dropLog.id)))[0];
    // A repeat is answered before the clock is read: a retry arriving after the cut-off still gets its version.
    if (stored.earlier) return { version: { ...stored.earlier, submittedAt: new Date(stored.earlier.submittedAt) }, duplicate: true };

    if (timing === "not-open") throw handInRefusal("not_open", `This lab opens for hand-ins on ${handInWindow.opensAt.toISOString()}.`);
    if (timing === "closed") throw pastCutoff(handInWindow);
    // Everything the version's statement writes is known here, its id and number included, so that the
    // receipt (whose subject names the number) and the jobs are written in that same statement.
    const version = { id: randomUUID(), version: stored.nextVersion, late: timing === "late", submittedAt: now };
    const reopen = lab.afterReleaseHandIns === "reopen";
    const receipt = receiptEmail(tx, access, { id: labId, title: lab.title }, version);
    const jobs = await jobsInsert([classComparisonRequest(labId), ...(receipt.job ? [receipt.job] : [])]);
    const inserted = tx
      .insert(dropLogVersions)
      .values({
        ...version,
        dropLogId: dropLog.id,
        idempotencyKey: keyCheck.data,
        submittedById: access.user.id,
        sphereId: kitRecords.sphere.id,
        fluidLotId: kitRecords.fluidLot.id,
        columnId: kitRecords.column.id,
        input: parsed,
        temperatureC: parsed.temperatureC,
        gravity: kitRecords.gravity,
        reductionMode: reduction.mode,
        kitRecords,
        reduction: { ...reduction, warnings },
        normalisedFigure,
        reynolds: reduction.reynolds,
        dragCoefficient: reduction.dragCoefficient,
        viscosityPaS: reduction.mode === "viscometry" ? reduction.viscosity : reduction.fluidViscosity,
        warningCount,
      })
      // Read by the first revision below: a statement's own inserts are not in its snapshot.
      .returning({
        id: dropLogVersions.id,
        kitRecords: dropLogVersions.kitRecords,
        reduction: dropLogVersions.reduction,
        normalisedFigure: dropLogVersions.normalisedFigure,
        reynolds: dropLogVersions.reynolds,
        dragCoefficient: dropLogVersions.dragCoefficient,
        viscosityPaS: dropLogVersions.viscosityPaS,
        warningCount: dropLogVersions.warningCount,
        submittedAt: dropLogVersions.submittedAt,
      });
    // One statement stores the version and everything that goes with it: it counts (the latest-version
    // pointer), takes the draft's photos, gets its reduction revision 1 (a copy of what it stores), the
    // student's receipt with its delivery job, and the relabel request. It also says whether the
    // student's mark is released: "refuse" then rolls the hand-in back, "reopen" reopens that mark
    // (which keeps the version it was marked on) in the same statement.
    // Raw: data-modifying CTEs over seven tables in one statement; the builder writes one table per statement.
    const counted = await executePrepared<{ markReleased: boolean }>(
      tx,
      reopen ? "hand_in_store_reopen" : "hand_in_store",
      sql`
      with inserted as ${inserted},
      attached as (update drop_log_photos set version_id = ${version.id} where drop_log_id = ${dropLog.id} and version_id is null),
      receipt as ${receipt.insert},
      jobs as (${jobs}),
      first_revision as (
        insert into reduction_revisions (version_id, revision, kit_records, reduction, normalised_figure, reynolds, drag_coefficient, viscosity_pa_s, warning_count, created_at)
        select id, 1, kit_records, reduction, normalised_figure, reynolds, drag_coefficient, viscosity_pa_s, warning_count, submitted_at from inserted)
      ${reopen ? sql`, reopened as (update marks set reopened_at = ${now.toISOString()}::timestamptz where lab_id = ${labId} and membership_id = ${access.membership.id} and released_at is not null)` : sql``}
      update drop_logs set latest_version_id = ${version.id}, draft = null, draft_saved_at = null where id = ${dropLog.id}
      returning ${markReleased(labId, access.membership.id)} as "markReleased"`,
    );
    if (counted.rows[0].markReleased && !reopen) throw handInRefusal("mark_released", markReleasedMessage);
    return { version, duplicate: false };
  });
}

/** A version as json_build_object returns it: the timestamp arrives as a string. */
type StoredVersionRow = { id: string; version: number; late: boolean; submittedAt: string };

/**
 * What a hand-in reads of its drop log's versions (in the statement's snapshot), beside the drop_logs
 * row: the version stored under this idempotency key, the number the next one gets, and the newest
 * version's id. The row's id is written qualified: a single-table statement names its columns bare,
 * which inside these subqueries would mean drop_log_versions' own id.
 */
const storedVersions = (key: string) => {
  const dropLogId = sql`${dropLogs}.id`;
  return {
    earlier: sql<StoredVersionRow | null>`(select json_build_object('id', v.id, 'version', v.version, 'late', v.late, 'submittedAt', v.submitted_at) from drop_log_versions v where v.drop_log_id = ${dropLogId} and v.idempotency_key = ${key})`,
    nextVersion: sql<number>`(select coalesce(max(v.version), 0) + 1 from drop_log_versions v where v.drop_log_id = ${dropLogId})::int`,
    seenLatestVersionId: sql<
      string | null
    >`(select v.id from drop_log_versions v where v.drop_log_id = ${dropLogId} order by v.version desc limit 1)`,
  };
};

/**
 * The hand-in's receipt to the student, once per version (its dedupe key names the version): a
 * replayed hand-in returns the stored version before this is reached, so it sends nothing new.
 */
function receiptEmail(tx: Executor, access: CourseAccess, lab: { id: string; title: string }, version: HandInResult["version"]) {
  return outboxEntry(tx, {
    to: access.user.email,
    toName: access.user.name,
    template: "hand-in-receipt",
    courseId: access.course.id,
    dedupeKey: `hand-in-receipt:${version.id}`,
    props: {
      studentName: access.user.name,
      courseTitle: access.course.title,
      labTitle: lab.title,
      version: version.version,
      handedInAt: version.submittedAt,
      timeZone: access.course.timeZone,
      late: version.late,
      receiptUrl: `${appUrl()}/courses/${access.course.id}/labs/${lab.id}#receipt`,
    },
  });
}

/** Saves the form as typed; a later save replaces the draft, never a handed-in version. */
export async function saveDraft(executor: Executor, { access, labId, draft }: { access: CourseAccess; labId: string; draft: unknown }) {
  const parsed = dropLogDraft.safeParse(draft);
  if (!parsed.success) throw handInRefusal("invalid_input", "The draft could not be read; keep typing and it will be saved again.");
  await loadStudentLab(executor, access, labId);
  const savedAt = new Date();
  const [row] = await executor
    .insert(dropLogs)
    .values({ labId, membershipId: access.membership.id, draft: parsed.data, draftSavedAt: savedAt })
    .onConflictDoUpdate({ target: [dropLogs.labId, dropLogs.membershipId], set: { draft: parsed.data, draftSavedAt: savedAt } })
    .returning({ id: dropLogs.id, draftSavedAt: dropLogs.draftSavedAt });
  return { dropLogId: row.id, savedAt: row.draftSavedAt! };
}

/** The id of the student's drop log for a lab, created empty when there is none (photos attach to it before a hand-in). */
export async function ensureDropLog(executor: Executor, { labId, membershipId }: { labId: string; membershipId: string }): Promise<string> {
  const [row] = await executor
    .insert(dropLogs)
    .values({ labId, membershipId })
    .onConflictDoUpdate({ target: [dropLogs.labId, dropLogs.membershipId], set: { labId: sql`excluded.lab_id` } })
    .returning({ id: dropLogs.id });
  return row.id;
}

export type StoredVersion = typeof dropLogVersions.$inferSelect;

/**
 * A student's drop log for one lab with every version (newest first) and its photos, in one statement.
 * The caller has checked that the viewer may see this student's work.
 */
export async function getDropLogForStudent(executor: Executor, { labId, membershipId }: { labId: string; membershipId: string }) {
  // The columns copied out of the JSON are for filtering and sorting; a version reads as the JSON it copies.
  const { temperatureC: _temperature, gravity: _gravity, reductionMode: _mode, ...versionColumns } = getTableColumns(dropLogVersions);
  const versions = jsonRows(
    versionColumns,
    sql`from ${dropLogVersions} where ${dropLogVersions.dropLogId} = ${dropLogs.id}`,
    sql`${dropLogVersions.version} desc`,
  );
  const photos = jsonRows(
    {
      id: dropLogPhotos.id,
      versionId: dropLogPhotos.versionId,
      contentType: dropLogPhotos.contentType,
      bytes: dropLogPhotos.bytes,
      originalName: dropLogPhotos.originalName,
      createdAt: dropLogPhotos.createdAt,
    },
    sql`from ${dropLogPhotos} where ${dropLogPhotos.dropLogId} = ${dropLogs.id}`,
    sql`${dropLogPhotos.createdAt} asc`,
  );
  const [row] = await executor
    .select({ dropLog: dropLogs, versions: versions.column, photos: photos.column })
    .from(dropLogs)
    .where(and(eq(dropLogs.labId, labId), eq(dropLogs.membershipId, membershipId)));
  const dropLog = row && { ...row.dropLog, versions: versions.read(row.versions), photos: photos.read(row.photos) };
  if (!dropLog) return null;
  const draft = dropLogDraft.safeParse(dropLog.draft ?? {});
  return { ...dropLog, draft: draft.success ? draft.data : {} };
}

/** Every version of a drop log, newest first. Versions are never changed or deleted. */
export async function listVersions(executor: Executor, dropLogId: string): Promise<StoredVersion[]> {
  return executor.select().from(dropLogVersions).where(eq(dropLogVersions.dropLogId, dropLogId)).orderBy(desc(dropLogVersions.version));
}

/** The course a lab belongs to, so an API call naming only the lab can check the caller's role in it. */
export async function findLabCourseId(executor: Executor, labId: string): Promise<string | null> {
  if (!isEntityId(labId)) return null;
  const [row] = await executor.select({ courseId: labs.courseId }).from(labs).where(eq(labs.id, labId));
  return row?.courseId ?? null;
}
