import { sql } from "drizzle-orm";
import { data } from "react-router";
import { db } from "~/server/db.server";
import { DATABASE_RETRY_AFTER_SECONDS, logDatabaseOutage } from "~/server/database-outage.server";

/**
 * Liveness and database reachability, for load balancers and the test harness. Public, so a failure
 * is logged here and answered without its text (which can name hosts, users and SQL).
 */
export async function loader() {
  const started = performance.now();
  try {
    await db.execute(sql`select 1`);
    return data(
      { status: "ok", database: { status: "up", latencyMs: Math.round(performance.now() - started) } },
      { headers: { "Cache-Control": "no-store" } },
    );
  } catch (error) {
    logDatabaseOutage("health check", error);
    return data(
      { status: "degraded", database: { status: "down" } },
      { status: 503, headers: { "Cache-Control": "no-store", "Retry-After": String(DATABASE_RETRY_AFTER_SECONDS) } },
    );
  }
}
