/**
 * Where the databases live. One definition shared by the database script, the start command,
 * the test harness and the app, so that they can never disagree.
 */
export const LOCAL_PORT = Number(process.env.BENCHPOST_PG_PORT ?? 54329);
export const LOCAL_USER = "benchpost";

/** The development database: DATABASE_URL when set, otherwise the project's own cluster. */
export function developmentDatabaseUrl(): string {
  return process.env.DATABASE_URL ?? `postgresql://${LOCAL_USER}@127.0.0.1:${LOCAL_PORT}/benchpost`;
}

/** The test database sits beside the development one, with `_test` appended to its name. */
export function testDatabaseUrl(): string {
  if (process.env.TEST_DATABASE_URL) return process.env.TEST_DATABASE_URL;
  return withDatabaseName(developmentDatabaseUrl(), `${databaseName(developmentDatabaseUrl())}_test`);
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
