/**
 * The JSON error shape of every /api route: `{ error: { code, message, issues? } }`, and the answers
 * every API route shares (a method it does not take).
 */
export type ApiIssue = { path: (string | number)[]; message: string };

export function isApiRequest(request: Request): boolean {
  return new URL(request.url).pathname.startsWith("/api/");
}

export function apiErrorResponse(
  status: number,
  code: string,
  message: string,
  issues?: ApiIssue[],
  headers?: Record<string, string>,
): Response {
  return Response.json(
    { error: { code, message, ...(issues?.length ? { issues } : {}) } },
    { status, headers: { "Cache-Control": "no-store", ...headers } },
  );
}

/** The methods an API route takes: GET routes answer HEAD too. */
export const readOnly = ["GET", "HEAD"] as const;

/**
 * 405 with `Allow`, in the error shape. Answered before any access check: which methods an address
 * takes is in the public OpenAPI document, and the answer touches no data.
 */
export function methodNotAllowed(allow: readonly string[]): Response {
  const response = apiErrorResponse(405, "method_not_allowed", `This address takes ${allow.join(", ")} only.`);
  response.headers.set("Allow", allow.join(", "));
  return response;
}
