import type { Route } from "./+types/v1.labs.$labId.drop-logs.$dropLogId";
import { requireStudentAccess } from "~/server/auth/access.server";
import { apiErrorResponse, methodNotAllowed, readOnly } from "~/server/auth/api-errors.server";
import { db } from "~/server/db.server";
import { findDropLogOwner } from "~/server/drop-logs/drop-log-list.server";
import { getDropLogForStudent } from "~/server/drop-logs/hand-in.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { anyRole } from "~/server/auth/access.server";
import { isEntityId } from "~/lib/forms/ids";

const noSuchDropLog = () => apiErrorResponse(404, "not_found", "There is no such drop log in this lab.");

/** One drop log with every version (newest first) and its photos: for its student, the instructors and the TAs of the student's cohort. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { lab } = await requireLabAccess({ request, context }, { labId: params.labId }, anyRole);
  if (!isEntityId(params.dropLogId)) return noSuchDropLog();
  const owner = await findDropLogOwner(db, lab.id, params.dropLogId);
  if (!owner) return noSuchDropLog();
  await requireStudentAccess({ request, context }, lab.courseId, owner);
  const dropLog = await getDropLogForStudent(db, { labId: lab.id, membershipId: owner.membershipId });
  if (!dropLog) return noSuchDropLog();
  const iso = (at: Date) => at.toISOString();
  return Response.json(
    {
      id: dropLog.id,
      labId: lab.id,
      membershipId: owner.membershipId,
      studentName: owner.studentName,
      versions: dropLog.versions.map(({ dropLogId: _dropLogId, idempotencyKey: _key, submittedById: _by, submittedAt, ...version }) => ({
        ...version,
        submittedAt: iso(submittedAt),
      })),
      photos: dropLog.photos.map((photo) => ({ ...photo, createdAt: iso(photo.createdAt) })),
    },
    { headers: { "Cache-Control": "no-store" } },
  );
}

/** Read-only: any other method is answered 405 with Allow. */
export const action = () => methodNotAllowed(readOnly);
