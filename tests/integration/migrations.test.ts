import { readFileSync } from "node:fs";
import pg from "pg";
import { afterAll, describe, expect, it } from "vitest";
import { migrateDatabase, migrationsFolder } from "~/server/migrate.server";
import { createEmptyDatabase, dropTestDatabase } from "../support/test-database";

const databases: string[] = [];

async function query<T extends pg.QueryResultRow>(url: string, sql: string): Promise<T[]> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    return (await client.query<T>(sql)).rows;
  } finally {
    await client.end();
  }
}

describe("migrations", () => {
  afterAll(() => Promise.all(databases.map(dropTestDatabase)));

  it("apply to an empty database, every one of them, and a second run changes nothing", async () => {
    const emptyUrl = await createEmptyDatabase();
    databases.push(emptyUrl);
    await migrateDatabase(emptyUrl);

    const journal = JSON.parse(readFileSync(`${migrationsFolder}/meta/_journal.json`, "utf8")) as { entries: unknown[] };
    const applied = await query<{ count: string }>(emptyUrl, "select count(*) from drizzle.__drizzle_migrations");
    expect(Number(applied[0].count)).toBe(journal.entries.length);

    const tables = (
      await query<{ table_name: string }>(emptyUrl, "select table_name from information_schema.tables where table_schema = 'public'")
    ).map((row) => row.table_name);
    expect(tables).toEqual(
      expect.arrayContaining(["users", "sessions", "courses", "cohorts", "course_memberships", "ta_cohort_assignments", "audit_events"]),
    );

    await migrateDatabase(emptyUrl);
    const again = await query<{ count: string }>(emptyUrl, "select count(*) from drizzle.__drizzle_migrations");
    expect(again[0].count).toBe(applied[0].count);
  });

  it("take turns when several instances migrate an empty database at once", async () => {
    const raceUrl = await createEmptyDatabase("race");
    databases.push(raceUrl);
    await Promise.all([migrateDatabase(raceUrl), migrateDatabase(raceUrl), migrateDatabase(raceUrl)]);
    const journal = JSON.parse(readFileSync(`${migrationsFolder}/meta/_journal.json`, "utf8")) as { entries: unknown[] };
    const applied = await query<{ count: string }>(raceUrl, "select count(*) from drizzle.__drizzle_migrations");
    expect(Number(applied[0].count)).toBe(journal.entries.length);
  });
});
