import { data } from "react-router";
import type { Route } from "./+types/courses.$courseId.labs.$labId.photos";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { HandInRefusedError, ensureDropLog, loadStudentLab } from "~/server/drop-logs/hand-in.server";
import { PhotoUploadError, receivePhotos, recordPhotos } from "~/server/drop-logs/photos.server";

/** Photos of the set-up, uploaded to the student's draft; the next hand-in attaches them to its version. */
export async function action({ request, params }: Route.ActionArgs) {
  const access = await requireCourseRole(request, params.courseId, ["student"]);
  try {
    await loadStudentLab(db, access, params.labId);
    const dropLogId = await ensureDropLog(db, { labId: params.labId, membershipId: access.membership.id });
    const photos = await recordPhotos(db, dropLogId, await receivePhotos(request, dropLogId));
    return { photos };
  } catch (error) {
    if (error instanceof PhotoUploadError || error instanceof HandInRefusedError) return data({ error: error.message }, { status: error.status });
    throw error;
  }
}
