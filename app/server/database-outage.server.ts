/**
 * When PostgreSQL cannot be reached (down, restarting, refusing connections), every request that
 * needs it is answered 503 with Retry-After instead of a 500: the API's error shape under /api/, the
 * 503 page elsewhere. The error itself is logged, never shown.
 *
 * React Router hands a loader's or action's error to the entry's `handleError` and renders (or, for a
 * resource route, answers) it before the root middleware's `next()` returns, so `handleError` marks
 * the request's context and the middleware turns the answer into the 503.
 */
import { createContext, data, type MiddlewareFunction, type RouterContextProvider } from "react-router";
import { apiErrorResponse, isApiRequest } from "~/server/auth/api-errors.server";
import { logger } from "~/server/log.server";

/** Long enough for a restart or a fail-over to finish, short enough that a retry from a phone soon succeeds. */
export const DATABASE_RETRY_AFTER_SECONDS = 30;

/** Connection-level failures of the socket, as Node names them. */
const socketErrors = new Set(["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "EHOSTUNREACH", "ENETUNREACH", "ENOTFOUND", "EAI_AGAIN", "EPIPE"]);
/**
 * PostgreSQL's own (SQLSTATE, Appendix A of its manual): class 08 connection exceptions, 57P01–57P03
 * (shutting down, crashed, not accepting connections yet) and 53300 (too many connections).
 */
const unavailableStates = /^(08...|57P0[1-3]|53300)$/;
/** node-postgres's words when a connection ends or cannot be had in time. */
const poolMessages = /Connection terminated|timeout exceeded when trying to connect|Client has encountered a connection error/i;

/** Whether an error (or what it wraps: Drizzle's query error, Node's AggregateError) says the database is unreachable. */
export function isDatabaseUnavailable(error: unknown, depth = 0): boolean {
  if (!(error instanceof Error) || depth > 5) return false;
  const code = (error as { code?: unknown }).code;
  if (typeof code === "string" && (socketErrors.has(code) || unavailableStates.test(code))) return true;
  if (poolMessages.test(error.message)) return true;
  if (error instanceof AggregateError && error.errors.some((inner) => isDatabaseUnavailable(inner, depth + 1))) return true;
  return isDatabaseUnavailable(error.cause, depth + 1);
}

/** One log line: the innermost cause (the socket's or the server's words), not Drizzle's "Failed query: …". */
export function logDatabaseOutage(where: string, error: unknown): void {
  let cause = error;
  while (cause instanceof Error && cause.cause instanceof Error) cause = cause.cause;
  logger.error({ where, reason: cause instanceof Error ? cause.message : String(cause) }, "PostgreSQL unreachable");
}

const requestLine = (request: Request) => `${request.method} ${new URL(request.url).pathname}`;

const databaseUnavailable = createContext<boolean>(false);

/** For the entry's `handleError`: remembers (and logs) that this request failed for want of the database. Returns whether it did. */
export function noteDatabaseOutage(
  error: unknown,
  { request, context }: { request: Request; context: Readonly<RouterContextProvider> },
): boolean {
  if (!isDatabaseUnavailable(error)) return false;
  context.set(databaseUnavailable, true);
  logDatabaseOutage(requestLine(request), error);
  return true;
}

const retryAfter = { "Retry-After": String(DATABASE_RETRY_AFTER_SECONDS) };

/** Root middleware, outermost: the 503 for any request whose work (or the session check) hit an unreachable database. */
export const databaseOutageGuard: MiddlewareFunction<Response> = async ({ request, context }, next) => {
  let response: Response | undefined;
  try {
    response = await next();
  } catch (error) {
    // A resource route's middleware error comes out of next() as it was thrown.
    if (!isDatabaseUnavailable(error)) throw error;
    logDatabaseOutage(requestLine(request), error);
  }
  if (response && !context.get(databaseUnavailable)) return response;
  if (isApiRequest(request)) {
    const outage = apiErrorResponse(
      503,
      "database_unavailable",
      `Benchpost cannot reach its database just now, so nothing was stored. Try again in ${DATABASE_RETRY_AFTER_SECONDS} seconds.`,
    );
    outage.headers.set("Retry-After", retryAfter["Retry-After"]);
    return outage;
  }
  // Pages render the root error page with this status (the entry adds Retry-After); downloads answer it as text.
  throw data("Benchpost cannot reach its database just now; nothing was stored. Try again shortly.", {
    status: 503,
    statusText: "Service Unavailable",
    headers: retryAfter,
  });
};
