/**
 * The Resend API as msw handlers. Like the real service, a repeated Idempotency-Key returns the first
 * answer instead of sending again; `failNext` makes the next requests answer with an error status.
 */
import { http, HttpResponse } from "msw";

export type ResendRequest = { idempotencyKey: string | null; authorization: string | null; body: Record<string, unknown> };

export function mockResend() {
  const requests: ResendRequest[] = [];
  /** Messages the mock accepted, by idempotency key: what a recipient would actually receive. */
  const accepted = new Map<string, { id: string; body: Record<string, unknown> }>();
  const failures: number[] = [];

  const handlers = [
    http.post("https://api.resend.com/emails", async ({ request }) => {
      const idempotencyKey = request.headers.get("idempotency-key");
      const body = (await request.json()) as Record<string, unknown>;
      requests.push({ idempotencyKey, authorization: request.headers.get("authorization"), body });
      const status = failures.shift();
      if (status === 429) {
        return HttpResponse.json({ statusCode: 429, name: "rate_limit_exceeded", message: "Too many requests" }, { status: 429 });
      }
      if (status) return HttpResponse.json({ statusCode: status, name: "internal_server_error", message: "Something broke" }, { status });
      const earlier = idempotencyKey ? accepted.get(idempotencyKey) : undefined;
      if (earlier) return HttpResponse.json({ id: earlier.id });
      const id = `re_mock_${accepted.size + 1}`;
      accepted.set(idempotencyKey ?? id, { id, body });
      return HttpResponse.json({ id });
    }),
  ];

  return {
    handlers,
    requests,
    accepted,
    failNext(...statuses: number[]) {
      failures.push(...statuses);
    },
    reset() {
      requests.length = 0;
      failures.length = 0;
    },
  };
}
