/**
 * `npm run db:migrate`: the release step of a production deployment. Applies the migrations once,
 * under an advisory lock (instances started together never race), and never seeds. Production runs
 * its bundled copy, build/migrate.js, from the checkout's root (it reads `drizzle/`).
 */
import { env } from "./lib/checked-environment";
import { migrateDatabase } from "~/server/migrate.server";

await migrateDatabase(env.DATABASE_URL);
console.log("Database migrated.");
