import { sql } from "drizzle-orm";
import { data } from "react-router";
import { db } from "~/server/db.server";

/** Liveness and database reachability, for load balancers and the test harness. */
export async function loader() {
  const started = performance.now();
  try {
    await db.execute(sql`select 1`);
    return data(
      { status: "ok", database: { status: "up", latencyMs: Math.round(performance.now() - started) } },
      { headers: { "Cache-Control": "no-store" } },
    );
  } catch (error) {
    return data(
      { status: "degraded", database: { status: "down", error: error instanceof Error ? error.message : String(error) } },
      { status: 503, headers: { "Cache-Control": "no-store" } },
    );
  }
}
