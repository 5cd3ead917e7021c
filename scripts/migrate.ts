/**
 * `npm run db:migrate`: the release step of a production deployment. Applies the migrations once,
 * under an advisory lock (instances started together never race), and never seeds. Production runs
 * its bundled copy, build/migrate.js, from the checkout's root (it reads `drizzle/`). The lock is a
 * session's, so behind a transaction-mode pooler it connects to PostgreSQL itself (DATABASE_DIRECT_URL):
 * through the pooler the lock would stay held by whichever server connection took it.
 */
import { env } from "./lib/checked-environment";
import { migrateDatabase } from "~/server/migrate.server";

await migrateDatabase(env.DATABASE_DIRECT_URL ?? env.DATABASE_URL);
console.log("Database migrated.");
