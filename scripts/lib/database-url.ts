/**
 * Where the databases live. One definition shared by the database script, the start command,
 * the test harness and drizzle-kit, so that they can never disagree; the app reads `environment().DATABASE_URL`.
 */
import { LOCAL_DATABASE_USER, environment } from "../../app/server/env.server";

/** The port of the project's own cluster (BENCHPOST_PG_PORT). */
export function localPort(): number {
  return environment().BENCHPOST_PG_PORT;
}
export const LOCAL_USER = LOCAL_DATABASE_USER;

/** The development database: DATABASE_URL when set, otherwise the project's own cluster. */
export function developmentDatabaseUrl(): string {
  return environment().DATABASE_URL;
}

/** The test database sits beside the development one, with `_test` appended to its name. */
export function testDatabaseUrl(): string {
  return environment().TEST_DATABASE_URL ?? withDatabaseName(developmentDatabaseUrl(), `${databaseName(developmentDatabaseUrl())}_test`);
}

export function databaseName(url: string): string {
  return decodeURIComponent(new URL(url).pathname.slice(1));
}

export function withDatabaseName(url: string, name: string): string {
  const parsed = new URL(url);
  parsed.pathname = `/${encodeURIComponent(name)}`;
  return parsed.toString();
}

/** The maintenance database of the same server, used to create and drop databases. */
export function maintenanceUrl(url: string): string {
  return withDatabaseName(url, "postgres");
}
