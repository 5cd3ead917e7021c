import type { Route } from "./+types/v1.reduce";
import { labReduceInput, reduceInput } from "~/lib/drop-logs/drop-log-input";
import { ReductionInputError, reduceFallingSphere } from "~/lib/reduction";
import { requireApiUser, requireCourseRole } from "~/server/auth/access.server";
import { apiErrorResponse, methodNotAllowed } from "~/server/auth/api-errors.server";
import { db } from "~/server/db.server";
import { withRefusals } from "~/server/errors.server";
import { findLabCourseId, previewDropLog } from "~/server/drop-logs/hand-in.server";

const noStore = { "Cache-Control": "no-store" };

/** Reducing changes nothing, but the input is a body: POST only. */
export const loader = () => methodNotAllowed(["POST"]);

/**
 * Reduces without storing anything. Two bodies: `{ labId, input }`, a drop log as the student types it
 * (mm, g, °C, s), resolved against the caller's kit and the lab's settings: the live preview of the
 * drop-log form; or the engine's own input in SI, for anyone signed in who wants the method itself.
 */
export const action = withRefusals(async ({ request, context }: Route.ActionArgs) => {
  if (request.method !== "POST") return methodNotAllowed(["POST"]);
  await requireApiUser({ request, context });
  const body = await request.json().catch(() => undefined);
  if (body === undefined) return apiErrorResponse(400, "invalid_json", "The body must be JSON.");

  const forLab = labReduceInput.safeParse(body);
  if (forLab.success) {
    const courseId = await findLabCourseId(db, forLab.data.labId);
    if (!courseId) return apiErrorResponse(404, "not_found", "There is no such lab.");
    const access = await requireCourseRole({ request, context }, courseId, ["student"]);
    return Response.json(await previewDropLog(db, { access, labId: forLab.data.labId, input: forLab.data.input }), { headers: noStore });
  }

  const engine = reduceInput.safeParse(body);
  if (!engine.success) {
    return apiErrorResponse(
      400,
      "invalid_input",
      "Send { labId, input } or the reduction engine's input in SI units.",
      engine.error.issues.map((issue) => ({ path: issue.path.map(String), message: issue.message })),
    );
  }
  try {
    return Response.json({ reduction: reduceFallingSphere(engine.data) }, { headers: noStore });
  } catch (error) {
    if (!(error instanceof ReductionInputError)) throw error;
    return apiErrorResponse(
      400,
      "not_reducible",
      "These values cannot be reduced.",
      error.issues.map((issue) => ({ path: issue.path.split("."), message: issue.message })),
    );
  }
});
