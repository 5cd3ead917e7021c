/**
 * `npm run test:scale`: the scale-out check alone, which `npm test` runs last: the production build
 * behind PgBouncer in transaction mode, with two web processes and two workers (tests/scale/). Prepares
 * what it needs as `npm test` does: the test database with its migrations, PgBouncer (installed from
 * Debian's packages when missing) and the production build in its own folder.
 */
import { migrateDatabase } from "~/server/migrate.server";
import { PRODUCTION_CHECK_DIRECTORY, buildApp } from "./lib/build";
import { testDatabaseUrl } from "./lib/database-url";
import { ensurePgBouncer } from "./lib/pgbouncer";
import { SetupError, ensureDatabases } from "./lib/postgres";
import { bin, runStep } from "./lib/processes";

try {
  await ensureDatabases();
  await migrateDatabase(testDatabaseUrl());
  ensurePgBouncer();
} catch (error) {
  console.error(error instanceof SetupError ? error.message : error);
  process.exit(1);
}

await buildApp({ demo: false, directory: PRODUCTION_CHECK_DIRECTORY, quiet: true });
runStep("Scale-out behind PgBouncer: two web processes, two workers", bin.vitest, ["run", "--project", "scale"]);
console.log("\nThe scale-out check passed.");
