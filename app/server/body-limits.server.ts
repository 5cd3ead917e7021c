/**
 * The most a request body may hold before any route reads it: every action reads its whole body into
 * memory (`request.formData()`, `request.json()`), so the cap is set once, in the root middleware,
 * and a larger body is answered 413. Set-up photos stream to disk and have their own caps
 * (app/lib/drop-logs/photo-limits.ts).
 */
import { data, type MiddlewareFunction } from "react-router";
import { MAX_PHOTO_UPLOAD_BYTES } from "~/lib/drop-logs/photo-limits";
import { apiErrorResponse, isApiRequest } from "~/server/auth/api-errors.server";
import { isSafeMethod } from "~/server/http.server";

const MB = 1024 * 1024;
/**
 * URL-encoded and multipart forms. The largest the app posts is a roster import: up to 10,000
 * previewed rows as one JSON field, about 2 MB once URL-encoded; 4 MB leaves room for long names.
 */
export const MAX_FORM_BYTES = 4 * MB;
/** JSON and any other body. The largest is a marking bulk action naming 5,000 students, about 200 KB. */
export const MAX_JSON_BYTES = 1 * MB;

/** The photo upload route (app/routes.ts), the one route that takes a multipart body larger than a form. */
const photoUploadPath = /^\/courses\/[^/]+\/labs\/[^/]+\/photos$/;

function limitFor(request: Request): number {
  const type = request.headers.get("content-type")?.toLowerCase() ?? "";
  if (type.startsWith("multipart/form-data"))
    return photoUploadPath.test(new URL(request.url).pathname) ? MAX_PHOTO_UPLOAD_BYTES : MAX_FORM_BYTES;
  if (type.startsWith("application/x-www-form-urlencoded")) return MAX_FORM_BYTES;
  return MAX_JSON_BYTES;
}

/**
 * Whether the body is larger than `limit`: its Content-Length says so (Node's server never delivers
 * more than that), or, for a body sent without one (chunked), a copy read up to one byte past the
 * limit. The copy's bytes stay buffered for the route, so that costs at most the limit in memory.
 */
async function exceeds(request: Request, limit: number): Promise<boolean> {
  const declared = request.headers.get("content-length");
  if (declared !== null) return Number(declared) > limit;
  if (!request.body) return false;
  const reader = request.clone().body!.getReader();
  let received = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) return false;
    received += value.byteLength;
    if (received > limit) {
      // Both halves of the copy: a cancelled half alone waits for the other one forever.
      await Promise.all([reader.cancel(), request.body.cancel()]);
      return true;
    }
  }
}

const megabytes = (bytes: number) => `${Math.floor(bytes / MB)} MB`;

/** Root middleware: answers 413 for a body over its limit, before the session check or the route reads it. */
export const bodyLimitGuard: MiddlewareFunction<Response> = async ({ request }, next) => {
  if (isSafeMethod(request.method)) return next();
  const limit = limitFor(request);
  if (!(await exceeds(request, limit))) return next();
  const message = `That request is larger than ${megabytes(limit)}, the most this address takes.`;
  if (isApiRequest(request)) return apiErrorResponse(413, "payload_too_large", message);
  throw data(message, { status: 413 });
};
