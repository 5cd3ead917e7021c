/**
 * Runs once before the integration and browser suites: the test server is up and the test database
 * (the template every test file copies) has every migration.
 */
import { migrateDatabase } from "~/server/migrate.server";
import { testDatabaseUrl } from "../../scripts/lib/database-url";
import { ensureDatabases } from "../../scripts/lib/postgres";

export default async function setup(): Promise<void> {
  await ensureDatabases();
  await migrateDatabase(testDatabaseUrl());
}
