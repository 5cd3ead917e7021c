/**
 * Each test file gets a fresh copy of the migrated template database, so files run in parallel without
 * seeing each other's rows. Copying a small template takes a few tens of milliseconds.
 */
import { randomBytes } from "node:crypto";
import pg from "pg";
import { databaseName, maintenanceUrl, testDatabaseUrl, withDatabaseName } from "../../scripts/lib/database-url";

// Read once at import, before a setup file points DATABASE_URL at a copy.
const templateUrl = testDatabaseUrl();
const quote = (name: string) => `"${name.replaceAll('"', '""')}"`;

async function onMaintenance<T>(work: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: maintenanceUrl(templateUrl) });
  await client.connect();
  try {
    return await work(client);
  } finally {
    await client.end();
  }
}

/** Creates a database copied from the migrated test template and returns its URL. */
export function createTestDatabase(label = "t"): Promise<string> {
  return createDatabaseFrom(databaseName(templateUrl), label);
}

/** Creates a database with nothing in it, not even the migrations, and returns its URL. */
export function createEmptyDatabase(label = "empty"): Promise<string> {
  return createDatabaseFrom("template0", label);
}

async function createDatabaseFrom(template: string, label: string): Promise<string> {
  const name = `${databaseName(templateUrl)}_${label}_${randomBytes(4).toString("hex")}`;
  await onMaintenance((client) => client.query(`create database ${quote(name)} template ${quote(template)}`));
  return withDatabaseName(templateUrl, name);
}

export async function dropTestDatabase(url: string): Promise<void> {
  await onMaintenance((client) => client.query(`drop database if exists ${quote(databaseName(url))} with (force)`));
}
