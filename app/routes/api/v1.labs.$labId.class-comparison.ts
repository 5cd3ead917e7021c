import type { Route } from "./+types/v1.labs.$labId.class-comparison";
import { requireApiUser } from "~/server/auth/access.server";
import { apiErrorResponse, methodNotAllowed, readOnly } from "~/server/auth/api-errors.server";
import { comparisonJson, getLabComparison, readComparisonFilters } from "~/server/comparison/class-comparison.server";
import { requireComparisonAccess } from "~/server/comparison/comparison-access.server";
import { db } from "~/server/db.server";
import { findLabCourseId } from "~/server/drop-logs/hand-in.server";

/**
 * The class comparison of a lab as JSON, labelled from the latest versions at the moment of the call;
 * `?cohort=<id>&label=suspect` narrows it as the page's filters do. Session or personal API token.
 */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  await requireApiUser(request);
  const courseId = await findLabCourseId(db, params.labId);
  if (!courseId) return apiErrorResponse(404, "not_found", "There is no such lab.");
  const { access, lab } = await requireComparisonAccess({ request, context }, courseId, params.labId);
  const comparison = await getLabComparison(db, access, lab, readComparisonFilters(request));
  return Response.json(comparisonJson(comparison), { headers: { "Cache-Control": "no-store" } });
}

/** Read-only: any other method is answered 405 with Allow. */
export const action = () => methodNotAllowed(readOnly);
