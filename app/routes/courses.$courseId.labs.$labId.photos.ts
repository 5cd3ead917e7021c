import { data } from "react-router";
import { AppError } from "~/lib/app-error";
import type { Route } from "./+types/courses.$courseId.labs.$labId.photos";
import { requireCourseRole } from "~/server/auth/access.server";
import { retryAfterHeaders } from "~/server/auth/session-responses.server";
import { db } from "~/server/db.server";
import { loadStudentLab } from "~/server/drop-logs/hand-in.server";
import { uploadDraftPhotos } from "~/server/drop-logs/photos.server";

/** Photos of the set-up, uploaded to the student's draft; the next hand-in attaches them to its version. */
export async function action({ request, context, params }: Route.ActionArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["student"]);
  try {
    const context = await loadStudentLab(db, access, params.labId);
    return { photos: await uploadDraftPhotos(db, { access, context, request }) };
  } catch (error) {
    // The upload is sent by script and shows the sentence beside the picker: it answers `{ error }`.
    if (!(error instanceof AppError)) throw error;
    return data(
      { error: error.message },
      { status: error.status, headers: error.retryAfterSeconds ? retryAfterHeaders(error.retryAfterSeconds) : undefined },
    );
  }
}
