/**
 * Vitest setup file of the integration suite: before a test file imports any app module, point
 * DATABASE_URL at a fresh copy of the migrated template, and drop that copy when the file is done.
 */
import { afterAll } from "vitest";
import { createTestDatabase, dropTestDatabase } from "./test-database";

const url = await createTestDatabase("it");
process.env.DATABASE_URL = url;

afterAll(async () => {
  const { pool } = await import("~/server/db.server");
  await pool.end();
  (globalThis as { benchpostPool?: unknown }).benchpostPool = undefined;
  await dropTestDatabase(url);
});
