/**
 * Benchmarks run against a throw-away copy of the migrated test database, so they never touch
 * development data. Import app modules only after `createBenchDatabase()` (they read DATABASE_URL once).
 */
import { readFileSync } from "node:fs";
import { cpus } from "node:os";
import { migrateDatabase } from "~/server/migrate.server";
import { testDatabaseUrl } from "../scripts/lib/database-url";
import { ensureDatabases } from "../scripts/lib/postgres";
import { createTestDatabase, dropTestDatabase } from "../tests/support/test-database";

export async function createBenchDatabase(): Promise<{ url: string; drop: () => Promise<void> }> {
  await ensureDatabases();
  await migrateDatabase(testDatabaseUrl());
  const url = await createTestDatabase("bench");
  process.env.DATABASE_URL = url;
  return {
    url,
    drop: async () => {
      const { pool } = await import("~/server/db.server");
      await pool.end();
      await dropTestDatabase(url);
    },
  };
}

/** Median and best of the timings, in milliseconds. */
export function summarise(timings: number[]): { median: number; best: number } {
  const sorted = [...timings].sort((a, b) => a - b);
  return { median: sorted[Math.floor(sorted.length / 2)], best: sorted[0] };
}

/** CPU seconds a process has used (user + system), from /proc on Linux; null where there is no /proc. */
function processCpuSeconds(pid: number): number | null {
  try {
    // Fields after the command name, which may hold spaces: utime and stime are the 12th and 13th, in ticks of 1/100 s.
    const fields = readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1].split(" ");
    return (Number(fields[11]) + Number(fields[12])) / 100;
  } catch {
    return null;
  }
}

function machineCpuSeconds(): { busy: number; total: number } {
  let busy = 0;
  let total = 0;
  for (const { times } of cpus()) {
    const all = times.user + times.nice + times.sys + times.irq + times.idle;
    total += all / 1000;
    busy += (all - times.idle) / 1000;
  }
  return { busy, total };
}

export type CpuAccount = { server: number | null; client: number; rest: number; available: number };

/**
 * Where the CPU went while a benchmark ran, in seconds: the server, this process (the load client),
 * and the rest of the machine (PostgreSQL, and whatever else is running). The client shares the cores
 * with the server, so a result is only about the server when the client and the rest leave it room.
 */
export function startCpuAccount(serverPid: number): () => CpuAccount {
  const server = processCpuSeconds(serverPid);
  const client = process.cpuUsage();
  const machine = machineCpuSeconds();
  return () => {
    const serverNow = server === null ? null : processCpuSeconds(serverPid);
    const serverUsed = server === null || serverNow === null ? null : serverNow - server;
    const clientSpent = process.cpuUsage(client);
    const clientUsed = (clientSpent.user + clientSpent.system) / 1e6;
    const now = machineCpuSeconds();
    return {
      server: serverUsed,
      client: clientUsed,
      rest: now.busy - machine.busy - clientUsed - (serverUsed ?? 0),
      available: now.total - machine.total,
    };
  };
}
