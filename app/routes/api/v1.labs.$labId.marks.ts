import type { Route } from "./+types/v1.labs.$labId.marks";
import { requireApiUser } from "~/server/auth/access.server";
import { apiErrorResponse, methodNotAllowed, readOnly } from "~/server/auth/api-errors.server";
import { db } from "~/server/db.server";
import { findLabCourseId } from "~/server/drop-logs/hand-in.server";
import { loadMarksJson } from "~/server/marking/mark-export.server";
import { requireMarkingAccess } from "~/server/marking/marking-lab.server";

/** The lab's marks as JSON for the institution's gradebook: instructors every cohort, TAs theirs. Session or personal API token. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  await requireApiUser(request);
  const courseId = await findLabCourseId(db, params.labId);
  if (!courseId) return apiErrorResponse(404, "not_found", "There is no such lab.");
  const { access, lab } = await requireMarkingAccess({ request, context }, courseId, params.labId);
  return Response.json(await loadMarksJson(db, { access, lab }), { headers: { "Cache-Control": "no-store" } });
}

/** Read-only: any other method is answered 405 with Allow. */
export const action = () => methodNotAllowed(readOnly);
