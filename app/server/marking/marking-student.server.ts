/**
 * One student's marking view: their desk row (the counted hand-in's key results, the suggestions,
 * the cells and the total), every version of their hand-in with its reduction and photos, and where
 * they stand in the desk's order, for moving on without the desk. The desk's own loader decides the
 * row and the order, so both pages agree; it costs the desk's statements and one for the drop log,
 * whatever the class size.
 */
import { photoView, versionView } from "~/lib/drop-logs/version-view";
import type { MarkingDeskFilters } from "~/lib/marking/desk-filters";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { getDropLogForStudent } from "~/server/drop-logs/hand-in.server";
import type { MarkingDeskRow } from "./mark-rows.server";
import { loadMarkingDesk } from "./marking-desk.server";
import type { MarkingLab } from "./marking-lab.server";

export type MarkingStudent = {
  row: MarkingDeskRow;
  /** Every version handed in, newest first, with the photos; null when nothing was handed in. */
  dropLog: {
    id: string;
    latestVersionId: string | null;
    versions: ReturnType<typeof versionView>[];
    photos: ReturnType<typeof photoView>[];
  } | null;
  /**
   * Where the student stands among the viewer's students in the desk's order (0-based), their
   * neighbours, and the first student after them, wrapping round, whose hand-in is still to mark.
   */
  order: { index: number; count: number; previousId: string | null; nextId: string | null; nextToMarkId: string | null };
  canEdit: boolean;
};

/**
 * The view of `membershipId` for `access`, in the order the desk's `filters` give (its criterion and
 * cohort; the status filter and paging are the desk's alone, so a student just marked stays in the
 * order). Null when the student is not one of the viewer's students of the lab. The caller checks
 * first that the viewer may see this student at all.
 */
export async function loadMarkingStudent(
  executor: Executor,
  {
    access,
    lab,
    membershipId,
    filters,
    now = new Date(),
  }: { access: CourseAccess; lab: MarkingLab; membershipId: string; filters: MarkingDeskFilters; now?: Date },
): Promise<MarkingStudent | null> {
  const load = (cohortId: string | undefined) =>
    loadMarkingDesk(executor, {
      access,
      lab,
      filters: { ...filters, cohortId, status: undefined, page: 1, pageSize: 1, studentId: membershipId },
      now,
    });
  let desk = await load(filters.cohortId);
  // A cohort filter left over from the desk that this student is not in: their view follows all the viewer's cohorts.
  if (desk.openId !== membershipId && filters.cohortId) desk = await load(undefined);
  if (desk.openId !== membershipId) return null;
  const row = desk.rows[0];
  const dropLog = row.handIn ? await getDropLogForStudent(executor, { labId: lab.id, membershipId }) : null;
  return {
    row,
    dropLog: dropLog
      ? {
          id: dropLog.id,
          latestVersionId: dropLog.latestVersionId,
          versions: dropLog.versions.map(versionView),
          photos: dropLog.photos.map(photoView),
        }
      : null,
    order: orderAround(desk.matchingIds, desk.toMarkIds, membershipId),
    canEdit: desk.canEdit,
  };
}

/** The neighbours of `id` in `ids`, and the next of `toMarkIds` after it in that order, wrapping round (never `id` itself). */
export function orderAround(ids: readonly string[], toMarkIds: readonly string[], id: string): MarkingStudent["order"] {
  const index = ids.indexOf(id);
  const waiting = new Set(toMarkIds);
  const after = [...ids.slice(index + 1), ...ids.slice(0, Math.max(index, 0))];
  return {
    index,
    count: ids.length,
    previousId: ids[index - 1] ?? null,
    nextId: ids[index + 1] ?? null,
    nextToMarkId: after.find((candidate) => waiting.has(candidate)) ?? null,
  };
}
