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

export type BenchStudent = {
  index: number;
  userId: string;
  membershipId: string;
  cohortId: string;
  kitId: string;
  sphereId: string;
  columnId: string;
  /** The Cookie header of the student's session. */
  cookie: string;
};
export type BenchStaff = { userId: string; membershipId: string; cookie: string };

/**
 * The class of a deadline rush, in a constant number of bulk statements: one course, `students`
 * students spread over `cohorts` cohorts, each with a kit at home (their own sphere and column, the
 * shared glycerol lot) and a session; `labs` published drag labs open to every cohort and due in
 * `dueInMs`; an instructor and a TA assigned to every cohort, signed in too. Call after `createBenchDatabase()`.
 */
export async function seedDeadlineClass({
  students: studentCount,
  cohorts: cohortCount = 1,
  labs: labCount = 1,
  dueInMs,
}: {
  students: number;
  cohorts?: number;
  labs?: number;
  dueInMs: number;
}) {
  const { db } = await import("~/server/db.server");
  const schema = await import("~/db/schema");
  const { insertMany } = await import("~/server/bulk-insert.server");
  const { createSession, SESSION_COOKIE } = await import("~/server/auth/session.server");
  const signIn = async (userId: string) => {
    const { token } = await createSession(db, userId, new Request("http://127.0.0.1/"));
    return `${SESSION_COOKIE}=${token}`;
  };

  const label = `bench-${randomUUID().slice(0, 8)}`;
  const [course] = await db
    .insert(schema.courses)
    .values({ title: "Deadline rush", code: label, term: "Bench", timeZone: "UTC" })
    .returning();
  const cohorts = await db
    .insert(schema.cohorts)
    .values(
      Array.from({ length: cohortCount }, (_, index) => ({
        courseId: course.id,
        name: cohortCount === 1 ? "Everyone" : `Bench ${index + 1}`,
      })),
    )
    .returning();
  const labs = await db
    .insert(schema.labs)
    .values(
      Array.from({ length: labCount }, (_, index) => ({
        courseId: course.id,
        title: labCount === 1 ? "Drag on a settling sphere" : `Drag on a settling sphere ${index + 1}`,
        kind: "drag" as const,
        status: "published" as const,
        opensAt: new Date(Date.now() - 86_400_000),
        dueAt: new Date(Date.now() + dueInMs),
        resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.5 },
        publishedAt: new Date(),
      })),
    )
    .returning();
  await db.insert(schema.labCohorts).values(labs.flatMap((lab) => cohorts.map((cohort) => ({ labId: lab.id, cohortId: cohort.id }))));
  const [fluidLot] = await db
    .insert(schema.parts)
    .values({
      courseId: course.id,
      kind: "fluid_lot",
      label: "GLY-B",
      fluidName: "glycerol",
      densityKgM3: 1260,
      calibration: [
        { temperatureC: 20, viscosityPaS: 1.41 },
        { temperatureC: 25, viscosityPaS: 0.94 },
      ],
    })
    .returning();
  const people = Array.from({ length: studentCount }, (_, index) => ({
    index,
    userId: randomUUID(),
    membershipId: randomUUID(),
    cohortId: cohorts[index % cohortCount].id,
    kitId: randomUUID(),
    sphereId: randomUUID(),
    columnId: randomUUID(),
  }));
  const instructorIds = { userId: randomUUID(), membershipId: randomUUID() };
  const taIds = { userId: randomUUID(), membershipId: randomUUID() };
  await insertMany(db, schema.users, [
    ...people.map((s) => ({ id: s.userId, email: `student${s.index}@${label}.example`, name: `Student ${s.index}` })),
    { id: instructorIds.userId, email: `instructor@${label}.example`, name: "Bench instructor" },
    { id: taIds.userId, email: `ta@${label}.example`, name: "Bench TA" },
  ]);
  await insertMany(db, schema.courseMemberships, [
    ...people.map((s) => ({ id: s.membershipId, courseId: course.id, userId: s.userId, role: "student" as const, cohortId: s.cohortId })),
    { id: instructorIds.membershipId, courseId: course.id, userId: instructorIds.userId, role: "instructor" as const, cohortId: null },
    { id: taIds.membershipId, courseId: course.id, userId: taIds.userId, role: "ta" as const, cohortId: null },
  ]);
  await db.insert(schema.taCohortAssignments).values(cohorts.map((cohort) => ({ membershipId: taIds.membershipId, cohortId: cohort.id })));
  // Two inserts: every row of an insertMany must name the same columns.
  await insertMany(
    db,
    schema.parts,
    people.map((s) => ({
      id: s.sphereId,
      courseId: course.id,
      kind: "sphere" as const,
      label: `S-${s.index}`,
      material: "steel",
      diameterMm: 3,
      massG: 0.11,
    })),
  );
  await insertMany(
    db,
    schema.parts,
    people.map((s) => ({
      id: s.columnId,
      courseId: course.id,
      kind: "column" as const,
      label: `C-${s.index}`,
      innerDiameterMm: 40,
      timedDistanceMm: 200,
      runInMm: 100,
    })),
  );
  await insertMany(
    db,
    schema.kits,
    people.map((s) => ({
      id: s.kitId,
      courseId: course.id,
      number: `K-${s.index}`,
      state: "at_home" as const,
      holderMembershipId: s.membershipId,
    })),
  );
  await insertMany(db, schema.kitParts, [
    ...people.flatMap((s) => [
      { kitId: s.kitId, partId: s.sphereId, exclusive: true },
      { kitId: s.kitId, partId: s.columnId, exclusive: true },
    ]),
    ...people.map((s) => ({ kitId: s.kitId, partId: fluidLot.id, exclusive: false })),
  ]);
  const students: BenchStudent[] = [];
  for (const person of people) students.push({ ...person, cookie: await signIn(person.userId) });
  const instructor: BenchStaff = { ...instructorIds, cookie: await signIn(instructorIds.userId) };
  const ta: BenchStaff = { ...taIds, cookie: await signIn(taIds.userId) };
  return { label, course, cohorts, labs, students, instructor, ta };
}

/** Ten drop times (s) for a student's hand-in; each later `attempt` is 0.02 s slower, so every version differs from the last. */
export function dropTimes(studentIndex: number, attempt = 0): number[] {
  return Array.from({ length: 10 }, (_, drop) =>
    Number((7.45 + (((studentIndex * 7 + drop * 3) % 11) - 5) * 0.01 + attempt * 0.02).toFixed(2)),
  );
}

export type HandInAnswer = { status: number; versionId: string | null; duplicate: boolean | null; error: string | null };

/** One hand-in as a phone sends it: the API's JSON body with the attempt's Idempotency-Key. */
export async function postHandIn(
  baseUrl: string,
  { labId, student, key, drops, signal }: { labId: string; student: BenchStudent; key: string; drops: number[]; signal: AbortSignal },
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
export async function startAppServer(databaseUrl: string, environment: Record<string, string> = {}): Promise<AppServer> {
  const { startFakeS3, FAKE_S3_BUCKET } = await import("~/server/storage/fake-s3.server");
  const s3Objects = await mkdtemp(path.join(tmpdir(), "benchpost-bench-s3-"));
  const s3 = await startFakeS3({ port: 0, directory: s3Objects, bucket: FAKE_S3_BUCKET });
  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  const server = spawn(process.execPath, ["build/web.js"], {
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
