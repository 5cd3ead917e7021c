/**
 * Structured logs: pino's JSON lines on standard output, one logger per process (web server, worker),
 * with the request id or the job's queue and id on each line that concerns one. LOG_LEVEL sets the
 * level; a log collector, not the app, decides where the lines go.
 */
import pino from "pino";
import { environment } from "~/server/env.server";

export const logger = pino({ level: environment().LOG_LEVEL, base: { pid: process.pid } });

/**
 * An incoming X-Request-Id is kept when it looks like one (a proxy's id ties its logs to ours);
 * anything else gets a fresh UUID, so a client cannot write arbitrary text into our logs.
 */
export function requestIdFrom(header: string | undefined): string {
  return header && /^[\w.:-]{8,128}$/.test(header) ? header : crypto.randomUUID();
}
