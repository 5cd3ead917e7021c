/**
 * Counts the SQL statements a piece of work sends through the app's pool, for the "constant number of
 * queries whatever the class size" checks.
 */
import pg from "pg";
import { vi } from "vitest";
import { pool } from "~/server/db.server";

export async function countStatements<T>(work: () => Promise<T>): Promise<{ statements: number; result: T }> {
  const spy = vi.spyOn(pool, "query");
  try {
    const result = await work();
    return { statements: spy.mock.calls.length, result };
  } finally {
    spy.mockRestore();
  }
}

/** Every statement sent, through the pool or a transaction's own client, begin and commit included. */
export async function countAllStatements<T>(work: () => Promise<T>): Promise<{ statements: number; result: T }> {
  const spy = vi.spyOn(pg.Client.prototype, "query");
  try {
    const result = await work();
    return { statements: spy.mock.calls.length, result };
  } finally {
    spy.mockRestore();
  }
}
