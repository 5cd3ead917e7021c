/**
 * The one error a rule of Benchpost throws when it refuses something the person asked for: a
 * duplicate label, a hand-in after the cut-off, a mark out of range. It carries what every answer
 * needs — a stable `code` for the API and tests, the HTTP `status`, a sentence for people, and where
 * the fault is (`field` for a form, `issues` for the API) — so that routes never translate errors
 * one class at a time. Unexpected failures stay plain Errors and become 500s.
 */
export type ErrorIssue = { path: (string | number)[]; message: string };

export type AppErrorInit = {
  code: string;
  message: string;
  /** 400 unless said: the request is refused as sent. 404 for what is not there, 409 for a conflict with the present state. */
  status?: number;
  /** The form field at fault, so that the message stands beside it. */
  field?: string;
  issues?: ErrorIssue[];
  /** The records a refusal is about when it is not the whole request: the students a bulk action was refused for. */
  subjectIds?: string[];
  /** For 429: how long to wait, sent as Retry-After. */
  retryAfterSeconds?: number;
};

export class AppError extends Error {
  readonly code: string;
  readonly status: number;
  readonly field: string | undefined;
  readonly issues: ErrorIssue[] | undefined;
  readonly subjectIds: string[];
  readonly retryAfterSeconds: number | undefined;

  constructor({ code, message, status = 400, field, issues, subjectIds = [], retryAfterSeconds }: AppErrorInit) {
    super(message);
    this.name = "AppError";
    this.code = code;
    this.status = status;
    this.field = field;
    this.issues = issues;
    this.subjectIds = subjectIds;
    this.retryAfterSeconds = retryAfterSeconds;
  }
}
