/**
 * Benchmarks run against a throw-away copy of the migrated test database, so they never touch
 * development data. Import app modules only after `createBenchDatabase()` (they read DATABASE_URL once).
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { randomUUID } from "node:crypto";
import { existsSync, readdirSync, readFileSync, statSync } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import { cpus, tmpdir } from "node:os";
import path from "node:path";
import { migrateDatabase } from "~/server/migrate.server";
import { testDatabaseUrl } from "../scripts/lib/database-url";
import { ensureDatabases } from "../scripts/lib/postgres";
import { bin } from "../scripts/lib/processes";
import { freePort, waitForHealth } from "../tests/support/app-server";
import { createTestDatabase, dropTestDatabase } from "../tests/support/test-database";
import type { HandInStudent, seedHandInClass } from "../tests/support/hand-in-class";

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

/**
 * The demo build (the one the test suites serve), built again whenever app/ has changed since it was
 * made: a build older than the code would measure the code as it was.
 */
export function buildAppIfChanged(): void {
  const builtAt = existsSync("build/web.js") ? statSync("build/web.js").mtimeMs : 0;
  const appChanged = readdirSync("app", { recursive: true, encoding: "utf8" }).some((file) => statSync(`app/${file}`).mtimeMs > builtAt);
  if (!appChanged) return;
  console.log("Building the app…");
  if (spawnSync(process.execPath, [bin.tsx, "scripts/build.ts", "--demo"], { stdio: "inherit" }).status !== 0)
    throw new Error("The build failed.");
}

export { dropTimes } from "../tests/support/drop-times";

/** The deadline class of tests/support/hand-in-class.ts, labelled for this run. Call after `createBenchDatabase()`. */
export async function seedDeadlineClass(options: Omit<Parameters<typeof seedHandInClass>[1], "label">) {
  const { db } = await import("~/server/db.server");
  const seeding = await import("../tests/support/hand-in-class");
  return seeding.seedHandInClass(db, { ...options, label: `bench-${randomUUID().slice(0, 8)}` });
}

export type HandInAnswer = { status: number; versionId: string | null; duplicate: boolean | null; error: string | null };

/** One hand-in as a phone sends it: the API's JSON body with the attempt's Idempotency-Key. */
export async function postHandIn(
  baseUrl: string,
  { labId, student, key, drops, signal }: { labId: string; student: HandInStudent; key: string; drops: number[]; signal: AbortSignal },
): Promise<HandInAnswer> {
  const response = await fetch(`${baseUrl}/api/v1/labs/${labId}/drop-logs`, {
    method: "POST",
    headers: { Cookie: student.cookie, Origin: baseUrl, "Content-Type": "application/json", "Idempotency-Key": key },
    body: JSON.stringify({ sphereId: student.sphereId, temperatureC: 21.5, drops }),
    signal,
  });
  // Read to the end first: a body cut off by the signal is a failed request (it throws), not an answer without a version.
  const text = await response.text();
  let body: { version?: { id: string }; duplicate?: boolean; error?: { code: string } } | null = null;
  try {
    body = JSON.parse(text);
  } catch {
    // Not JSON (a proxy's or the framework's error page): the status says enough.
  }
  return {
    status: response.status,
    versionId: body?.version?.id ?? null,
    duplicate: body?.duplicate ?? null,
    error: body?.error?.code ?? null,
  };
}

/** Every stored version of the lab's drop logs, with the key it was handed in under. */
export async function storedVersions(labId: string): Promise<{ id: string; dropLogId: string; idempotencyKey: string }[]> {
  const { db } = await import("~/server/db.server");
  const { dropLogs, dropLogVersions } = await import("~/db/schema");
  const { eq } = await import("drizzle-orm");
  return db
    .select({ id: dropLogVersions.id, dropLogId: dropLogVersions.dropLogId, idempotencyKey: dropLogVersions.idempotencyKey })
    .from(dropLogVersions)
    .innerJoin(dropLogs, eq(dropLogs.id, dropLogVersions.dropLogId))
    .where(eq(dropLogs.labId, labId));
}

export type AppServer = { baseUrl: string; process: ChildProcess; stop: () => Promise<void> };

/**
 * The built app (build/web.js) on loopback, started with the node binary itself so that the PID is
 * the server's (with WEB_CONCURRENCY above 1, the cluster's primary), against the bench database.
 * A production process needs its photo bucket, though no bench request sends a photo: the local
 * fake's, started here and stopped with the server.
 */
export async function startAppServer(
  databaseUrl: string,
  {
    environment = {},
    buildDirectory = "build",
    nodeArguments = [],
  }: {
    environment?: Record<string, string>;
    /** Another build folder inside the checkout (so that its imports find node_modules). */
    buildDirectory?: string;
    /** Given to node before the script, e.g. `--cpu-prof`. */
    nodeArguments?: string[];
  } = {},
): Promise<AppServer> {
  const { startFakeS3, FAKE_S3_BUCKET } = await import("~/server/storage/fake-s3.server");
  const s3Objects = await mkdtemp(path.join(tmpdir(), "benchpost-bench-s3-"));
  const s3 = await startFakeS3({ port: 0, directory: s3Objects, bucket: FAKE_S3_BUCKET });
  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  const server = spawn(process.execPath, [...nodeArguments, path.join(buildDirectory, "web.js")], {
    env: {
      ...process.env,
      NODE_ENV: "production",
      PORT: String(port),
      HOST: "127.0.0.1",
      APP_URL: baseUrl,
      TRUST_PROXY: "0",
      DATABASE_URL: databaseUrl,
      SMTP_URL: "smtp://127.0.0.1:1025",
      ...s3.environment,
      ...environment,
    },
    stdio: ["ignore", "ignore", "pipe"],
  });
  // Under load a warning can repeat thousands of times: each distinct line is shown once, with its count at the end.
  const stderrLines = new Map<string, { line: string; count: number }>();
  let partial = "";
  server.stderr!.setEncoding("utf8");
  server.stderr!.on("data", (chunk: string) => {
    const lines = (partial + chunk).split("\n");
    partial = lines.pop()!;
    for (const line of lines) {
      const key = line.replace(/^\(node:\d+\) /, "");
      const seen = stderrLines.get(key);
      if (seen) seen.count++;
      else {
        stderrLines.set(key, { line, count: 1 });
        process.stderr.write(`[app] ${line}\n`);
      }
    }
  });
  // A benchmark that dies (an uncaught error) must not leave its server running.
  const killOnExit = () => server.kill("SIGTERM");
  process.once("exit", killOnExit);
  const stop = async () => {
    process.off("exit", killOnExit);
    if (server.exitCode === null && server.signalCode === null) {
      const exited = new Promise((resolve) => server.once("exit", resolve));
      server.kill("SIGTERM");
      await exited;
    }
    await s3.close();
    await rm(s3Objects, { recursive: true, force: true });
    for (const { line, count } of stderrLines.values())
      if (count > 1) console.error(`[app] ${count} times in all: ${line.length > 140 ? `${line.slice(0, 140)}…` : line}`);
  };
  try {
    await waitForHealth(baseUrl, server);
  } catch (error) {
    await stop();
    throw error;
  }
  return { baseUrl, process: server, stop };
}
