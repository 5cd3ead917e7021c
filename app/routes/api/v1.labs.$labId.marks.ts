import type { Route } from "./+types/v1.labs.$labId.marks";
import { staffRoles } from "~/server/auth/access.server";
import { methodNotAllowed, readOnly } from "~/server/auth/api-errors.server";
import { db } from "~/server/db.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarksJson } from "~/server/marking/mark-export.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";

/** The lab's marks as JSON for the institution's gradebook: instructors every cohort, TAs theirs. Session or personal API token. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, { labId: params.labId }, staffRoles, loadMarkingLab);
  return Response.json(await loadMarksJson(db, { access, lab }), { headers: { "Cache-Control": "no-store" } });
}

/** Read-only: any other method is answered 405 with Allow. */
export const action = () => methodNotAllowed(readOnly);
