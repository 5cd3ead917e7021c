/**
 * `npm run bench:handin`: the last minutes before a deadline. 200 students, each with a kit and a
 * session, hand in through the running app server (the built app on loopback, on a bench copy of the
 * database) at once: a hand-in, a retry of it with the same Idempotency-Key (a double tap or a lost
 * answer), and a corrected second version. Prints hand-ins per second, latency percentiles and the CPU
 * the server, this load client and the rest of the machine used (they share the cores), then checks
 * that every accepted hand-in is stored exactly once. Bounded: 600 requests, 60 s.
 *
 * `BENCH_BUILD=<dir>` serves another build folder (see below). `BENCH_CPU_PROF=<dir>` runs the server under `node --cpu-prof` into that folder and prints where its
 * CPU went during the load (bench/cpu-profile.ts): the top frames and packages by self time.
 */
import { spawn, spawnSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import { existsSync, readdirSync, statSync } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { freePort, waitForHealth } from "../tests/support/app-server";
import { bin } from "../scripts/lib/processes";
import { formatCpuSummary, newestCpuProfile, readCpuProfile, summariseCpuProfile } from "./cpu-profile";
import { startCpuAccount, createBenchDatabase } from "./support";

const STUDENTS = 200;
const REQUEST_TIMEOUT_MS = 30_000;
const OVERALL_DEADLINE_MS = 60_000;

// A build older than the code would measure the code as it was: build again whenever app/ has changed since
// (the demo build, which the test suites also use). BENCH_BUILD names another build folder inside the
// checkout (so that its imports find node_modules), served as it is: a copy of an earlier build, to
// compare two builds in the same minutes of a shared machine.
const buildDirectory = process.env.BENCH_BUILD ?? "build";
const builtAt = existsSync("build/web.js") ? statSync("build/web.js").mtimeMs : 0;
const appChanged = readdirSync("app", { recursive: true, encoding: "utf8" }).some((file) => statSync(`app/${file}`).mtimeMs > builtAt);
if (buildDirectory === "build" && appChanged) {
  console.log("Building the app…");
  if (spawnSync(process.execPath, [bin.tsx, "scripts/build.ts", "--demo"], { stdio: "inherit" }).status !== 0)
    throw new Error("The build failed.");
}

const bench = await createBenchDatabase();
const { sql } = await import("drizzle-orm");
const { db } = await import("~/server/db.server");
const { seedHandInClass, dropTimes } = await import("../tests/support/hand-in-class");

const label = `bench-${randomUUID().slice(0, 8)}`;
const { labId, students } = await seedHandInClass(db, { students: STUDENTS, label });

// The server: the node binary itself (so the PID is the server's), loopback only. A production
// process needs its photo bucket, though no hand-in here sends a photo: the local fake's.
const { startFakeS3, FAKE_S3_BUCKET } = await import("~/server/storage/fake-s3.server");
const s3Objects = await mkdtemp(path.join(tmpdir(), "benchpost-bench-s3-"));
const s3 = await startFakeS3({ port: 0, directory: s3Objects, bucket: FAKE_S3_BUCKET });
const port = await freePort();
const baseUrl = `http://127.0.0.1:${port}`;
const profileDirectory = process.env.BENCH_CPU_PROF ? path.resolve(process.env.BENCH_CPU_PROF) : null;
const profiling = profileDirectory ? ["--cpu-prof", `--cpu-prof-dir=${profileDirectory}`] : [];
const server = spawn(process.execPath, [...profiling, path.join(buildDirectory, "web.js")], {
  env: {
    ...process.env,
    NODE_ENV: "production",
    PORT: String(port),
    HOST: "127.0.0.1",
    APP_URL: baseUrl,
    TRUST_PROXY: "0",
    DATABASE_URL: bench.url,
    SMTP_URL: "smtp://127.0.0.1:1025",
    ...s3.environment,
  },
  stdio: ["ignore", "ignore", "inherit"],
});

type Outcome = {
  student: number;
  key: string;
  status: number;
  versionId: string | null;
  duplicate: boolean | null;
  error: string | null;
  ms: number;
};
const outcomes: Outcome[] = [];
const deadline = Date.now() + OVERALL_DEADLINE_MS;

async function handIn(student: (typeof students)[number], key: string, drops: number[]): Promise<void> {
  if (Date.now() > deadline) throw new Error("The benchmark ran past its 60 s bound.");
  const started = performance.now();
  const response = await fetch(`${baseUrl}/api/v1/labs/${labId}/drop-logs`, {
    method: "POST",
    headers: { Cookie: student.cookie, Origin: baseUrl, "Content-Type": "application/json", "Idempotency-Key": key },
    body: JSON.stringify({ sphereId: student.sphereId, temperatureC: 21.5, drops }),
    signal: AbortSignal.timeout(REQUEST_TIMEOUT_MS),
  });
  const body = (await response.json().catch(() => null)) as {
    version?: { id: string };
    duplicate?: boolean;
    error?: { code: string };
  } | null;
  outcomes.push({
    student: student.index,
    key,
    status: response.status,
    versionId: body?.version?.id ?? null,
    duplicate: body?.duplicate ?? null,
    error: body?.error?.code ?? null,
    ms: performance.now() - started,
  });
}

const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
let failed = false;
// The load's span on the monotonic clock the profile's samples are stamped with, so the summary leaves start-up out.
let loadSpan: { fromUs: number; toUs: number } | undefined;
try {
  await waitForHealth(baseUrl, server);
  const cpuAccount = startCpuAccount(server.pid!);
  const started = performance.now();
  const loadStartUs = Number(process.hrtime.bigint() / 1000n);
  // Every student at once; each one's own requests in order, as one phone would send them.
  await Promise.all(
    students.map(async (student) => {
      const drops = dropTimes(student.index);
      const first = `${label}-${student.index}-a`;
      await handIn(student, first, drops);
      await handIn(student, first, drops);
      await handIn(
        student,
        `${label}-${student.index}-b`,
        drops.map((time) => Number((time + 0.02).toFixed(2))),
      );
    }),
  );
  const seconds = (performance.now() - started) / 1000;
  const cpu = cpuAccount();
  loadSpan = { fromUs: loadStartUs, toUs: Number(process.hrtime.bigint() / 1000n) };

  const accepted = outcomes.filter((outcome) => outcome.status === 201);
  const repeats = outcomes.filter((outcome) => outcome.status === 200);
  const others = outcomes.filter((outcome) => outcome.status !== 201 && outcome.status !== 200);
  const latencies = outcomes.map((outcome) => outcome.ms).sort((a, b) => a - b);
  console.log(
    `${outcomes.length} requests from ${STUDENTS} students in ${seconds.toFixed(2)} s: ${accepted.length} new versions (201), ${repeats.length} repeats (200), ${others.length} other`,
  );
  console.log(
    `hand-ins stored per second: ${(accepted.length / seconds).toFixed(0)}; requests per second: ${(outcomes.length / seconds).toFixed(0)}`,
  );
  console.log(
    `latency: p50 ${percentile(latencies, 50).toFixed(0)} ms, p95 ${percentile(latencies, 95).toFixed(0)} ms, p99 ${percentile(latencies, 99).toFixed(0)} ms, max ${latencies.at(-1)!.toFixed(0)} ms`,
  );
  // The load client runs on the same cores as the server: say what it and the rest of the machine took.
  const perRequest = (cpuSeconds: number) => `${((cpuSeconds * 1000) / outcomes.length).toFixed(1)} ms a request`;
  console.log(
    `CPU during the run (${cpu.available.toFixed(1)} s available): server ${cpu.server === null ? "unknown (no /proc)" : `${cpu.server.toFixed(1)} s, ${perRequest(cpu.server)}`}; ` +
      `this load client ${cpu.client.toFixed(1)} s, ${perRequest(cpu.client)}; PostgreSQL and everything else ${cpu.rest.toFixed(1)} s`,
  );

  // Exactly once: one stored version per accepted answer, each repeat answered with its first version.
  const stored = await db.execute<{ versions: number; keys: number; logs: number }>(sql`
    select count(*)::int as versions, count(distinct (v.drop_log_id, v.idempotency_key))::int as keys, count(distinct v.drop_log_id)::int as logs
    from drop_log_versions v join drop_logs d on d.id = v.drop_log_id where d.lab_id = ${labId}`);
  const { versions, keys, logs } = stored.rows[0];
  const firstVersion = new Map(accepted.map((outcome) => [outcome.key, outcome.versionId]));
  const repeatsMatch = repeats.every((outcome) => outcome.duplicate === true && firstVersion.get(outcome.key) === outcome.versionId);
  const checks = [
    [`no request failed (${[...new Set(others.map((o) => `${o.status} ${o.error}`))].join(", ") || "none"})`, others.length === 0],
    [`stored versions ${versions} = accepted hand-ins ${accepted.length}`, versions === accepted.length],
    [`idempotency keys unique (${keys} keys for ${versions} versions)`, keys === versions],
    [`one drop log per student (${logs})`, logs === STUDENTS],
    ["every repeat answered with the version first stored", repeatsMatch],
  ] as const;
  for (const [name, ok] of checks) console.log(`${ok ? "PASS" : "FAIL"} ${name}`);
  failed = checks.some(([, ok]) => !ok);
} finally {
  server.kill("SIGTERM");
  await new Promise((resolve) => (server.exitCode !== null ? resolve(null) : server.once("exit", resolve)));
  await s3.close();
  await rm(s3Objects, { recursive: true, force: true });
  await bench.drop();
}
if (profileDirectory) {
  // The server writes its profile as it exits (above).
  const file = newestCpuProfile(profileDirectory);
  console.log(`\n${file}`);
  console.log(formatCpuSummary(summariseCpuProfile(readCpuProfile(file), loadSpan), { requests: outcomes.length }));
}
if (failed) process.exitCode = 1;
