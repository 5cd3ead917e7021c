import { fileURLToPath } from "node:url";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import pg from "pg";
import { installJobQueues } from "./jobs/boss.server";

export const migrationsFolder = fileURLToPath(new URL("../../drizzle", import.meta.url));

/** Applies every migration in `drizzle/` that the database has not seen yet, then pg-boss's schema and queues. */
export async function migrateDatabase(connectionString: string): Promise<void> {
  const pool = new pg.Pool({ connectionString, max: 1 });
  try {
    await migrate(drizzle(pool), { migrationsFolder });
  } finally {
    await pool.end();
  }
  await installJobQueues(connectionString);
}
