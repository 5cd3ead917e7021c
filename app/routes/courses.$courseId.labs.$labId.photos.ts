import { data } from "react-router";
import type { Route } from "./+types/courses.$courseId.labs.$labId.photos";
import { requireCourseRole } from "~/server/auth/access.server";
import { retryAfterHeaders } from "~/server/auth/session-responses.server";
import { db } from "~/server/db.server";
import { HandInRefusedError, loadStudentLab } from "~/server/drop-logs/hand-in.server";
import { PhotoUploadError, uploadDraftPhotos } from "~/server/drop-logs/photos.server";

/** Photos of the set-up, uploaded to the student's draft; the next hand-in attaches them to its version. */
export async function action({ request, params }: Route.ActionArgs) {
  const access = await requireCourseRole(request, params.courseId, ["student"]);
  try {
    const context = await loadStudentLab(db, access, params.labId);
    return { photos: await uploadDraftPhotos(db, { access, context, request }) };
  } catch (error) {
    if (error instanceof PhotoUploadError) {
      return data({ error: error.message }, { status: error.status, headers: error.retryAfterSeconds ? retryAfterHeaders(error.retryAfterSeconds) : undefined });
    }
    if (error instanceof HandInRefusedError) return data({ error: error.message }, { status: error.status });
    throw error;
  }
}
