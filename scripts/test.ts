/**
 * `npm test`: every check the project has, in the order that fails fastest. Prepares what the suites
 * need (the test database with its migrations, Debian's Chromium) when it is missing.
 */
import { migrateDatabase } from "~/server/migrate.server";
import { PRODUCTION_CHECK_DIRECTORY, buildApp } from "./lib/build";
import { ensureChromium } from "./lib/chromium";
import { testDatabaseUrl } from "./lib/database-url";
import { ensurePgBouncer } from "./lib/pgbouncer";
import { SetupError, ensureDatabases } from "./lib/postgres";
import { bin, runStep } from "./lib/processes";

// With DATABASE_URL the cluster is someone else's: the suite must not try to manage it.
const env = { ...process.env, ...(process.env.DATABASE_URL ? { BENCHPOST_EXTERNAL_DATABASE: "1" } : {}) };

try {
  await ensureDatabases();
  await migrateDatabase(testDatabaseUrl());
  ensureChromium();
  ensurePgBouncer();
} catch (error) {
  console.error(error instanceof SetupError ? error.message : error);
  process.exit(1);
}

runStep("Type-checking (react-router typegen && tsc)", bin.reactRouter, ["typegen"], env);
runStep("Type-checking", bin.tsc, [], env);
runStep("Lint (eslint .)", bin.eslint, ["."], env);
runStep("Formatting (prettier --check .)", bin.prettier, ["--check", "."], env);
// The demo build, before the suites: the HTTP-level integration tests and the browser tests serve it.
await buildApp({ demo: true });
runStep("Unit and integration tests", bin.vitest, ["run", "--project", "unit", "--project", "integration"], env);
runStep("Browser tests (Chromium)", bin.vitest, ["run", "--project", "browser"], env);
// Last, in a folder of its own so that the demo build stays for the suites: the production build,
// run as a deployment runs it (tests/production/).
await buildApp({ demo: false, directory: PRODUCTION_CHECK_DIRECTORY, quiet: true });
runStep("Production build: release step, web server, worker", bin.vitest, ["run", "--project", "production"], env);
// The same build scaled out behind PgBouncer in transaction mode (tests/scale/; alone: npm run test:scale).
runStep("Scale-out behind PgBouncer: two web processes, two workers", bin.vitest, ["run", "--project", "scale"], env);
console.log("\nAll checks passed.");
