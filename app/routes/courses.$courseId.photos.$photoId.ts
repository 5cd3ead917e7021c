import { data } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.photos.$photoId";
import { anyRole, requireCourseRole, requireStudentAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { findPhoto, readPhoto, removeDraftPhoto } from "~/server/drop-logs/photos.server";
import { isEntityId } from "~/lib/forms/ids";

/** A set-up photo, for its student, the course's instructors and the TAs of the student's cohort. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  // Membership first, so that people outside the course learn nothing about which photos exist.
  const access = await requireCourseRole({ request, context }, params.courseId, anyRole);
  const photo = isEntityId(params.photoId) ? await findPhoto(db, access.course.id, params.photoId) : null;
  if (!photo) throw data("Not found", { status: 404 });
  await requireStudentAccess({ request, context }, access.course.id, { userId: photo.ownerUserId, cohortId: photo.ownerCohortId });
  const file = await readPhoto(photo.storageKey);
  if (!file) throw data("Not found", { status: 404 });
  return new Response(file.stream(), {
    headers: {
      // The type the bytes were checked to be, never the uploader's claim.
      "Content-Type": photo.contentType,
      "Content-Length": String(photo.bytes),
      "Content-Disposition": "inline",
      "X-Content-Type-Options": "nosniff",
      "Cache-Control": "private, max-age=3600",
    },
  });
}

const removal = z.object({ intent: z.literal("remove") });

/** A student takes a photo off their draft (sent by script from the lab page); handed-in photos stay. */
export async function action({ request, context, params }: Route.ActionArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["student"]);
  if (!removal.safeParse(Object.fromEntries(await request.formData())).success)
    throw data("Send intent=remove to take a photo off your draft.", { status: 400 });
  if (!isEntityId(params.photoId) || !(await removeDraftPhoto(db, access, params.photoId)))
    throw data("There is no such photo on your draft.", { status: 404 });
  return { removed: params.photoId };
}
