import type { Route } from "./+types/v1.courses.$courseId.labs";
import { dropLogStatus } from "~/lib/drop-logs/hand-in-window";
import { anyRole, isStaff, requireApiUser, requireCourseRole } from "~/server/auth/access.server";
import { methodNotAllowed, readOnly } from "~/server/auth/api-errors.server";
import { db } from "~/server/db.server";
import { listLabsForMember } from "~/server/drop-logs/lab-list.server";

/** The labs the caller sees in a course (the lab list page's, as JSON). Session or personal API token. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  await requireApiUser({ request, context });
  const access = await requireCourseRole({ request, context }, params.courseId, anyRole);
  const rows = await listLabsForMember(db, access);
  const staff = isStaff(access);
  const labs = rows.map(({ hasDraft, latestLate, versionCount, ...lab }) => ({
    ...lab,
    dropLog: staff ? null : { status: dropLogStatus({ hasDraft, latestLate }), versionCount },
  }));
  return Response.json({ labs }, { headers: { "Cache-Control": "no-store" } });
}

/** Read-only: any other method is answered 405 with Allow. */
export const action = () => methodNotAllowed(readOnly);
