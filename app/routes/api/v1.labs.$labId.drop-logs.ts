import type { Route } from "./+types/v1.labs.$labId.drop-logs";
import { apiErrorResponse, methodNotAllowed, readOnly } from "~/server/auth/api-errors.server";
import { db } from "~/server/db.server";
import { withRefusals } from "~/server/errors.server";
import { listLabDropLogs } from "~/server/drop-logs/drop-log-list.server";
import { handInDropLog } from "~/server/drop-logs/hand-in.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { anyRole } from "~/server/auth/access.server";

const noStore = { "Cache-Control": "no-store" };

/**
 * JSON with its length stated. The server's compression leaves bodies under 1 KB alone only when it
 * knows their length, and gzip on a hand-in's answer of a few hundred bytes costs both ends more
 * than it saves.
 */
function jsonWithLength(body: unknown, status: number): Response {
  const text = JSON.stringify(body);
  return new Response(text, {
    status,
    headers: { ...noStore, "Content-Type": "application/json", "Content-Length": String(Buffer.byteLength(text)) },
  });
}

/** A student's own drop log, or (staff) every handed-in drop log of the cohorts they see, with the counted reductions. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, { labId: params.labId }, anyRole);
  return Response.json({ dropLogs: await listLabDropLogs(db, access, lab.id) }, { headers: noStore });
}

/**
 * A student's hand-in. The `Idempotency-Key` header names the attempt: a retry with the same key
 * answers 200 with the version first stored instead of storing a second one.
 */
export const action = withRefusals(async ({ request, context, params }: Route.ActionArgs) => {
  if (request.method !== "POST") return methodNotAllowed([...readOnly, "POST"]);
  const { access, lab } = await requireLabAccess({ request, context }, { labId: params.labId }, anyRole);
  if (access.membership.role !== "student") return apiErrorResponse(403, "not_a_student", "Only students hand in drop logs.");
  const idempotencyKey = request.headers.get("Idempotency-Key");
  if (!idempotencyKey)
    return apiErrorResponse(400, "idempotency_key_missing", "Send an Idempotency-Key header, e.g. a UUID made once per hand-in attempt.");
  const input = await request.json().catch(() => undefined);
  if (input === undefined) return apiErrorResponse(400, "invalid_json", "The body must be JSON.");
  const result = await handInDropLog(db, { access, labId: lab.id, input, idempotencyKey });
  return jsonWithLength(result, result.duplicate ? 200 : 201);
});
