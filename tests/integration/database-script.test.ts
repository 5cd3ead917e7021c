import { execFileSync } from "node:child_process";
import { statSync } from "node:fs";
import { join } from "node:path";
import pg from "pg";
import { describe, expect, it } from "vitest";
import { maintenanceUrl, testDatabaseUrl } from "../../scripts/lib/database-url";
import { clusterFolder } from "../../scripts/lib/postgres";
import { bin } from "../../scripts/lib/processes";

// The script must manage the project's own cluster, so run it without the per-file DATABASE_URL.
const { DATABASE_URL: _perFileCopy, ...env } = process.env;

function dbScript(command: string): string {
  return execFileSync(process.execPath, [bin.tsx, "scripts/db.ts", command], { env, encoding: "utf8" });
}

/** The two databases the script manages; other test files create and drop copies meanwhile. */
async function databaseNames(): Promise<string[]> {
  const client = new pg.Client({ connectionString: maintenanceUrl(testDatabaseUrl()) });
  await client.connect();
  try {
    const { rows } = await client.query<{ datname: string }>(
      "select datname from pg_database where datname in ('benchpost', 'benchpost_test') order by 1",
    );
    return rows.map((row) => row.datname);
  } finally {
    await client.end();
  }
}

describe.skipIf(Boolean(process.env.BENCHPOST_EXTERNAL_DATABASE))("npm run db:start", () => {
  it("is idempotent: a second run reports nothing to change and leaves the cluster and databases as they were", async () => {
    dbScript("start");
    const versionFile = join(clusterFolder(), "PG_VERSION");
    const before = { created: statSync(versionFile).mtimeMs, databases: await databaseNames() };

    expect(dbScript("start")).toContain("nothing to change");
    expect(statSync(versionFile).mtimeMs).toBe(before.created);
    expect(await databaseNames()).toEqual(before.databases);
    expect(dbScript("status")).toMatch(/^running on 127\.0\.0\.1:\d+/);
  });
});
