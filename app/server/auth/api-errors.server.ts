/**
 * The JSON error shape of every /api route: `{ error: { code, message, issues? } }`.
 */
export type ApiIssue = { path: (string | number)[]; message: string };

export function isApiRequest(request: Request): boolean {
  return new URL(request.url).pathname.startsWith("/api/");
}

export function apiErrorResponse(status: number, code: string, message: string, issues?: ApiIssue[]): Response {
  return Response.json({ error: { code, message, ...(issues ? { issues } : {}) } }, { status, headers: { "Cache-Control": "no-store" } });
}
