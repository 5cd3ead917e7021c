/**
 * The one database client of this process. Everything that reads or writes PostgreSQL goes through `db`.
 */
import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import { environment } from "./env.server";
import { logger } from "~/server/log.server";

export type Database = NodePgDatabase;
/** A transaction handle: business changes and the e-mails or jobs they cause share one. */
export type Transaction = Parameters<Parameters<Database["transaction"]>[0]>[0];
export type Executor = Database | Transaction;

/** A unique constraint refused the write (SQLSTATE 23505), on the driver's error or Drizzle's wrapping of it. */
export function isUniqueViolation(error: unknown): boolean {
  const cause = (error as { cause?: { code?: string } })?.cause ?? error;
  return (cause as { code?: string })?.code === "23505";
}

export function createPool(connectionString = environment().DATABASE_URL): pg.Pool {
  const pool = new pg.Pool({ connectionString, max: environment().DATABASE_POOL_SIZE });
  // An idle connection dropped by a database restart must not take the process down; the pool reconnects.
  pool.on("error", (error) => logger.error({ reason: error.message }, "PostgreSQL connection lost"));
  return pool;
}

export function createDatabase(pool: pg.Pool): Database {
  return drizzle(pool);
}

// Kept on globalThis so that hot reload in development does not open a new pool per edit.
const globalForDb = globalThis as unknown as { benchpostPool?: pg.Pool };
export const pool = (globalForDb.benchpostPool ??= createPool());
export const db = createDatabase(pool);
