/**
 * Benchmarks run against a throw-away copy of the migrated test database, so they never touch
 * development data. Import app modules only after `useBenchDatabase()` (they read DATABASE_URL once).
 */
import { migrateDatabase } from "~/server/migrate.server";
import { testDatabaseUrl } from "../scripts/lib/database-url";
import { ensureDatabases } from "../scripts/lib/postgres";
import { createTestDatabase, dropTestDatabase } from "../tests/support/test-database";

export async function useBenchDatabase(): Promise<{ url: string; drop: () => Promise<void> }> {
  await ensureDatabases();
  await migrateDatabase(testDatabaseUrl());
  const url = await createTestDatabase("bench");
  process.env.DATABASE_URL = url;
  return {
    url,
    drop: async () => {
      const { pool } = await import("~/server/db.server");
      await pool.end();
      await dropTestDatabase(url);
    },
  };
}

/** Median and best of the timings, in milliseconds. */
export function summarise(timings: number[]): { median: number; best: number } {
  const sorted = [...timings].sort((a, b) => a - b);
  return { median: sorted[Math.floor(sorted.length / 2)], best: sorted[0] };
}
