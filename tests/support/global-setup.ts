/**
 * Runs once before the integration and browser suites: the test server is up, the test database
 * (the template every test file copies) has every migration, and the fake carrier listens on a free
 * loopback port, where `integration-setup.ts` points CARRIER_API_URL so that test files can buy labels.
 */
import type { TestProject } from "vitest/node";
import { migrateDatabase } from "~/server/migrate.server";
import { startFakeCarrier } from "~/server/shipping/fake-carrier.server";
import { testDatabaseUrl } from "../../scripts/lib/database-url";
import { ensureDatabases } from "../../scripts/lib/postgres";

declare module "vitest" {
  export interface ProvidedContext {
    carrierApiUrl: string;
  }
}

export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  await ensureDatabases();
  await migrateDatabase(testDatabaseUrl());
  const carrier = await startFakeCarrier({ port: 0, log: () => undefined });
  project.provide("carrierApiUrl", carrier.apiUrl);
  return () => carrier.close();
}
