/**
 * `npm run bench:handin`: the last minutes before a deadline. 200 students, each with a kit and a
 * session, hand in through the running app server (the built app on loopback, on a bench copy of the
 * database) at once: a hand-in, a retry of it with the same Idempotency-Key (a double tap or a lost
 * answer), and a corrected second version. Prints hand-ins per second, latency percentiles and the CPU
 * the server, this load client and the rest of the machine used (they share the cores), then checks
 * that every accepted hand-in is stored exactly once. Bounded: 600 requests, 60 s.
 *
 * `BENCH_BUILD=<dir>` serves another build folder inside the checkout as it is (a copy of an earlier
 * build, to compare two builds in the same minutes of a shared machine). `BENCH_CPU_PROF=<dir>` runs
 * the server under `node --cpu-prof` into that folder and prints where its CPU went during the load
 * (bench/cpu-profile.ts): the top frames and packages by self time.
 */
import path from "node:path";
import { sql } from "drizzle-orm";
import { formatCpuSummary, newestCpuProfile, readCpuProfile, summariseCpuProfile } from "./cpu-profile";
import {
  buildAppIfChanged,
  createBenchDatabase,
  dropTimes,
  postHandIn,
  seedDeadlineClass,
  startAppServer,
  startCpuAccount,
} from "./support";
import type { HandInStudent } from "../tests/support/hand-in-class";

const STUDENTS = 200;
const REQUEST_TIMEOUT_MS = 30_000;
const OVERALL_DEADLINE_MS = 60_000;

const buildDirectory = process.env.BENCH_BUILD;
if (!buildDirectory) buildAppIfChanged();
const bench = await createBenchDatabase();
const { db } = await import("~/server/db.server");

// The class: one course, one cohort, a published lab due in ten minutes, a kit per student.
const {
  label,
  labs: [lab],
  students,
} = await seedDeadlineClass({ students: STUDENTS, dueInMs: 600_000 });
const profileDirectory = process.env.BENCH_CPU_PROF ? path.resolve(process.env.BENCH_CPU_PROF) : null;
const server = await startAppServer(bench.url, {
  buildDirectory,
  nodeArguments: profileDirectory ? ["--cpu-prof", `--cpu-prof-dir=${profileDirectory}`] : [],
});
const { baseUrl } = server;

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

async function handIn(student: HandInStudent, key: string, drops: number[]): Promise<void> {
  if (Date.now() > deadline) throw new Error("The benchmark ran past its 60 s bound.");
  const started = performance.now();
  const answer = await postHandIn(baseUrl, { labId: lab.id, student, key, drops, signal: AbortSignal.timeout(REQUEST_TIMEOUT_MS) });
  outcomes.push({ student: student.index, key, ...answer, ms: performance.now() - started });
}

const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
let failed = false;
// The load's span on the monotonic clock the profile's samples are stamped with, so the summary leaves start-up out.
let loadSpan: { fromUs: number; toUs: number } | undefined;
try {
  const cpuAccount = startCpuAccount(server.process.pid!);
  const started = performance.now();
  const loadStartUs = Number(process.hrtime.bigint() / 1000n);
  // Every student at once; each one's own requests in order, as one phone would send them.
  await Promise.all(
    students.map(async (student) => {
      const first = `${label}-${student.index}-a`;
      await handIn(student, first, dropTimes(student.index));
      await handIn(student, first, dropTimes(student.index));
      await handIn(student, `${label}-${student.index}-b`, dropTimes(student.index, 1));
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
    from drop_log_versions v join drop_logs d on d.id = v.drop_log_id where d.lab_id = ${lab.id}`);
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
  await server.stop();
  await bench.drop();
}
if (profileDirectory) {
  // The server writes its profile as it exits (above).
  const file = newestCpuProfile(profileDirectory);
  console.log(`\n${file}`);
  console.log(formatCpuSummary(summariseCpuProfile(readCpuProfile(file), loadSpan), { requests: outcomes.length }));
}
if (failed) process.exitCode = 1;
