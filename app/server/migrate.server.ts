import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import pg from "pg";
import { installJobQueues } from "./jobs/boss.server";

// From the working directory, not this file: the release step runs bundled from build/, and npm
// scripts, the tests and the bundled scripts all run in the checkout's root.
export const migrationsFolder = path.resolve("drizzle");

/**
 * Applies every migration in `drizzle/` that the database has not seen yet, then pg-boss's schema and
 * queues. The whole run holds a PostgreSQL advisory lock, so that the release steps of several
 * instances started at once take turns: the later ones find nothing left to do. The lock belongs to
 * the session, so `connectionString` must reach PostgreSQL directly or through a pooler that keeps
 * sessions: a transaction-mode pooler would leave it held on a server connection after we are gone.
 */
export async function migrateDatabase(connectionString: string): Promise<void> {
  const client = new pg.Client({ connectionString });
  await client.connect();
  try {
    // A session lock, released when the session ends, whatever happened in between.
    await client.query("select pg_advisory_lock(hashtext('benchpost migrations'))");
    await migrate(drizzle(client), { migrationsFolder });
    await installJobQueues(connectionString);
  } finally {
    await client.end();
  }
}
