import type { Route } from "./+types/v1.labs.$labId.class-comparison";
import { staffRoles } from "~/server/auth/access.server";
import { methodNotAllowed, readOnly } from "~/server/auth/api-errors.server";
import { comparisonJson, getLabComparison, loadComparisonLab, readComparisonFilters } from "~/server/comparison/class-comparison.server";
import { db } from "~/server/db.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";

/**
 * The class comparison of a lab as JSON, labelled from the latest versions at the moment of the call;
 * `?cohort=<id>&label=suspect` narrows it as the page's filters do. Session or personal API token.
 */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, { labId: params.labId }, staffRoles, loadComparisonLab);
  const comparison = await getLabComparison(db, access, lab, readComparisonFilters(request));
  return Response.json(comparisonJson(comparison), { headers: { "Cache-Control": "no-store" } });
}

/** Read-only: any other method is answered 405 with Allow. */
export const action = () => methodNotAllowed(readOnly);
