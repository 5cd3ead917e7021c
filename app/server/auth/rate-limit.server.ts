/**
 * Attempt limits kept in PostgreSQL (rate-limiter-flexible's RateLimiterPostgres on the `rate_limits`
 * table), so that they hold across every app instance.
 */
import { RateLimiterPostgres, RateLimiterRes } from "rate-limiter-flexible";
import { pool } from "~/server/db.server";

type LimitName = "sign-in-ip" | "sign-in-account" | "email-link-address" | "email-link-ip" | "photo-upload";

/**
 * Points per window. Sign-in refunds the point of a success, so it counts failures; e-mailed links
 * count every request. Photo uploads count every request per person: a hand-in needs a few uploads,
 * and 30 an hour leave room for retries on a poor phone connection while keeping a script from
 * hammering the disk.
 */
const settings: Record<LimitName, { points: number; durationSeconds: number }> = {
  "sign-in-ip": { points: 10, durationSeconds: 15 * 60 },
  "sign-in-account": { points: 10, durationSeconds: 60 * 60 },
  "email-link-address": { points: 5, durationSeconds: 60 * 60 },
  "email-link-ip": { points: 30, durationSeconds: 60 * 60 },
  "photo-upload": { points: 30, durationSeconds: 60 * 60 },
};

const limiters = new Map<LimitName, RateLimiterPostgres>();

/**
 * The library names its statements, and a named prepared statement lives in one server session: behind
 * a transaction-mode pooler (PgBouncer before 1.21) the next use lands on a server connection that has
 * it already ("already exists") or not at all ("does not exist"). So its queries go unnamed, planned
 * each time: one-row upserts and lookups by key, cheap to plan.
 */
const unnamedStatements = {
  query: ({ text, values }: { text: string; values?: unknown[] }) => pool.query(text, values),
};

function limiter(name: LimitName): RateLimiterPostgres {
  let existing = limiters.get(name);
  if (!existing) {
    const { points, durationSeconds } = settings[name];
    existing = new RateLimiterPostgres({
      storeClient: unnamedStatements,
      storeType: "pool",
      tableName: "rate_limits",
      // The table comes from our migrations; the library's timer-driven clean-up would keep the process alive.
      tableCreated: true,
      clearExpiredByTimeout: false,
      keyPrefix: name,
      points,
      duration: durationSeconds,
    });
    limiters.set(name, existing);
  }
  return existing;
}

export type LimitCheck = { limited: false } | { limited: true; retryAfterSeconds: number };

const retryAfter = (res: RateLimiterRes) => Math.max(1, Math.ceil(res.msBeforeNext / 1000));

/**
 * Spends one point and says whether the key was already over its limit. Spending comes first so that
 * requests arriving together cannot all pass a check made before any of them counted. A null key (no
 * trusted client address, see `clientIp`) is never limited: one shared bucket would let anybody lock
 * everybody out.
 */
export async function consume(name: LimitName, key: string | null): Promise<LimitCheck> {
  if (key === null) return { limited: false };
  try {
    await limiter(name).consume(key);
    return { limited: false };
  } catch (error) {
    if (error instanceof RateLimiterRes) return { limited: true, retryAfterSeconds: retryAfter(error) };
    throw error;
  }
}

/** Gives back the point a request spent, for limits that count failures only. */
export async function refund(name: LimitName, key: string | null): Promise<void> {
  if (key === null) return;
  await limiter(name).reward(key, 1);
}

/** The first limit that is reached among several checks, or `{ limited: false }`. */
export function firstLimited(checks: LimitCheck[]): LimitCheck {
  return checks.find((check) => check.limited) ?? { limited: false };
}
