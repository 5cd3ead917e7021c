/**
 * Vitest setup file of the integration suite and the production check: before a test file imports any
 * app module, point DATABASE_URL at a database of the file's own, and drop it when the file is done.
 * Integration tests get a fresh copy of the migrated template; the production check (which provides
 * `emptyDatabase`) an empty database, which its release step migrates. Labels are bought from the
 * fake carrier that the global setup started.
 */
import { afterAll, inject } from "vitest";
import { FAKE_CARRIER_API_KEY } from "~/server/shipping/fake-carrier.server";
import { createEmptyDatabase, createTestDatabase, dropTestDatabase } from "./test-database";

declare module "vitest" {
  export interface ProvidedContext {
    emptyDatabase?: boolean;
  }
}

const url = inject("emptyDatabase") ? await createEmptyDatabase("production") : await createTestDatabase("it");
process.env.DATABASE_URL = url;
process.env.CARRIER_API_URL = inject("carrierApiUrl");
process.env.CARRIER_API_KEY = FAKE_CARRIER_API_KEY;

afterAll(async () => {
  const { pool } = await import("~/server/db.server");
  await pool.end();
  (globalThis as { benchpostPool?: unknown }).benchpostPool = undefined;
  await dropTestDatabase(url);
});
