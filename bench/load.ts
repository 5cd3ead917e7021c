/**
 * `npm run bench:load`: an open-loop load test of the built app during a deadline rush, beside the
 * framework's floor measured in the same run.
 *
 * Open loop: each step sends requests at a fixed rate, at fixed instants, whether or not the earlier
 * ones have been answered, and a request's latency counts from the instant it was due, not from when
 * it left. A slow server therefore meets a queue, as it would with real students, and the queueing is
 * in the figures (no coordinated omission). Rates climb in steps; a ladder stops after two failing
 * steps in a row, and the whole run at its overall deadline.
 *
 * The mix (by share of the requests): hand-ins 40 % (the API, as a phone posts them, 30 % of them a
 * retry of an earlier hand-in with its Idempotency-Key: a double tap or a lost answer), the student's
 * lab page 30 % (a document request), the marking desk's card save 15 % (the fetcher's single-fetch
 * POST, expectedVersion from the student's previous answer; a conflict is an answer, not an error),
 * and the class comparison page 15 % (the instructor's). The mix runs on the app with WEB_CONCURRENCY=1
 * and =2, then a ladder of lab pages alone on each, for the gain of a second process.
 *
 * The floor: a trivial React Router app (bench/floor/: a page with a loader, a resource route with an
 * action) built with the project's @react-router/dev and served by @react-router/serve, measured first
 * up to its own ceiling, then with the same client at every rate the app is, half page, half action. GET figures are divided by the
 * floor page's at the same rate, POST figures by the floor action's.
 *
 * A step passes with p99 < 250 ms and no error (any other answer than 2xx, a desk save's 409 aside;
 * a timeout; a request not sent because too many were in flight). After each mix ladder every hand-in
 * answered 200 or 201 is checked to be stored exactly once: the highest sustainable rate also needs no
 * lost hand-in in its step. Loopback only; `--quick` (or BENCH_LOAD_STEP_SECONDS) shortens the steps.
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { setImmediate as yieldToEvents, setTimeout as sleep } from "node:timers/promises";
import { UNSAFE_decodeViaTurboStream as decodeViaTurboStream } from "react-router";
import { bin } from "../scripts/lib/processes";
import { freePort, waitForHealth } from "../tests/support/app-server";
import { seededRandom } from "../tests/support/seeded-random";
import {
  buildAppIfChanged,
  createBenchDatabase,
  dropTimes,
  postHandIn,
  seedDeadlineClass,
  startAppServer,
  storedVersions,
  type AppServer,
} from "./support";
import type { HandInStudent } from "../tests/support/hand-in-class";

const quick = process.argv.includes("--quick");
const STEP_SECONDS = Number(process.env.BENCH_LOAD_STEP_SECONDS ?? (quick ? 3 : 8));
// From a slow start: on a shared two-core machine the app is saturated in the tens.
const RATES = [10, 15, 20, 30, 40, 50, 60, 80, 100, 130, 160, 200, 250, 320];
/** The floor's own ladder, run first so that its ceiling is known whatever the app's ladders take. */
const FLOOR_RATES = [100, 200, 300, 400, 600, 800, 1000, 1200, 1500];
const P99_BUDGET_MS = 250;
const REQUEST_TIMEOUT_MS = 2_000;
const MAX_IN_FLIGHT = 256;
const FAILED_STEPS_TO_STOP = 2;
const OVERALL_DEADLINE_MS = (quick ? 4 : 8) * 60_000;
const STUDENTS = 300;
const COHORTS = 6;
/** Students with a hand-in before the rush starts, so the desk and the comparison have work to show. */
const HANDED_IN_BEFORE = 150;
const MIX = [
  { kind: "hand-in", share: 0.4 },
  { kind: "lab page", share: 0.3 },
  { kind: "desk save", share: 0.15 },
  { kind: "comparison", share: 0.15 },
] as const;
const RETRY_SHARE = 0.3;
const WARM_UP_SECONDS = 3;

type AppKind = (typeof MIX)[number]["kind"];
type Kind = AppKind | "floor page" | "floor action";
const postKinds = new Set<Kind>(["hand-in", "desk save", "floor action"]);
const runDeadline = Date.now() + OVERALL_DEADLINE_MS;
const began = performance.now();
const elapsed = () => `${((performance.now() - began) / 1000).toFixed(0)} s into the run`;

// ── The open-loop client ──────────────────────────────────────────────────────────────────────────
// Node's fetch, on its default undici Agent: one per process, keep-alive, no limit on connections
// per origin (the cap on requests in flight is ours, MAX_IN_FLIGHT), so a slow answer never holds a
// later request back. Every body is read to its end: the latency includes the transfer.

type Answer = { ok: boolean; status: number; conflict?: boolean };
type Shot = { kind: Kind; send: (signal: AbortSignal) => Promise<Answer> };
type Sample = { kind: Kind; ms: number; ok: boolean; failure: string | null; conflict: boolean };
type Step = { rate: number; samples: Sample[]; sendLagP99: number; clientCpu: number; seconds: number };

async function fire(shot: Shot, dueAt: number): Promise<Sample> {
  // Our own timer, not AbortSignal.timeout: fetch holds its signal weakly, and a collected signal never fires.
  // The race answers the sample even if the abort is not heard.
  const controller = new AbortController();
  let timer: NodeJS.Timeout | undefined;
  const timedOut = new Promise<never>((_, reject) => {
    timer = setTimeout(() => {
      const error = new DOMException("The request took too long", "TimeoutError");
      controller.abort(error);
      reject(error);
    }, REQUEST_TIMEOUT_MS);
  });
  try {
    const answer = await Promise.race([shot.send(controller.signal), timedOut]);
    return {
      kind: shot.kind,
      ms: performance.now() - dueAt,
      ok: answer.ok,
      failure: answer.ok ? null : String(answer.status),
      conflict: answer.conflict ?? false,
    };
  } catch (error) {
    const failure = error instanceof Error && error.name === "TimeoutError" ? "timeout" : "no answer";
    return { kind: shot.kind, ms: performance.now() - dueAt, ok: false, failure, conflict: false };
  } finally {
    clearTimeout(timer);
  }
}

/** One step: `rate` requests a second for `seconds`, each due at its own instant; `next(i)` makes request i when it is due. */
async function runStep(rate: number, next: (index: number) => Shot, seconds = STEP_SECONDS): Promise<Step> {
  const count = Math.round(rate * seconds);
  const interval = 1000 / rate;
  const samples: Sample[] = [];
  const lags: number[] = [];
  const inFlight = new Set<Promise<void>>();
  const cpu = process.cpuUsage();
  const start = performance.now() + 20;
  for (let index = 0; index < count; index++) {
    const dueAt = start + index * interval;
    const wait = dueAt - performance.now();
    // Behind schedule, still let answers in between sends.
    await (wait > 0.5 ? sleep(wait) : yieldToEvents());
    lags.push(performance.now() - dueAt);
    const shot = next(index);
    if (inFlight.size >= MAX_IN_FLIGHT) {
      samples.push({ kind: shot.kind, ms: Number.NaN, ok: false, failure: "not sent (too many in flight)", conflict: false });
      continue;
    }
    const request: Promise<void> = fire(shot, dueAt).then((sample) => {
      samples.push(sample);
      inFlight.delete(request);
    });
    inFlight.add(request);
  }
  await Promise.all(inFlight);
  const duration = (performance.now() - start) / 1000;
  const used = process.cpuUsage(cpu);
  return { rate, samples, sendLagP99: percentile(lags, 99), clientCpu: (used.user + used.system) / 1e6 / duration, seconds: duration };
}

function percentile(values: number[], p: number): number {
  const sorted = values.filter((value) => !Number.isNaN(value)).sort((a, b) => a - b);
  return sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] : Number.NaN;
}

type Figures = { count: number; p50: number; p99: number; errors: number; conflicts: number; failures: string[] };
function figures(samples: Sample[]): Figures {
  const failed = samples.filter((sample) => !sample.ok);
  return {
    count: samples.length,
    p50: percentile(
      samples.map((sample) => sample.ms),
      50,
    ),
    p99: percentile(
      samples.map((sample) => sample.ms),
      99,
    ),
    errors: failed.length,
    conflicts: samples.filter((sample) => sample.conflict).length,
    failures: [...new Set(failed.map((sample) => sample.failure!))],
  };
}
const passes = (step: Step) => {
  const all = figures(step.samples);
  return all.errors === 0 && all.p99 < P99_BUDGET_MS;
};

// ── The floor ─────────────────────────────────────────────────────────────────────────────────────

buildAppIfChanged();
const floorBuild = spawnSync(process.execPath, [bin.reactRouter, "build", "bench/floor"], { encoding: "utf8" });
if (floorBuild.status !== 0) throw new Error(`The floor's build failed:\n${floorBuild.stdout}\n${floorBuild.stderr}`);
const floorPort = await freePort();
const floorUrl = `http://127.0.0.1:${floorPort}`;
// The serve package's own bin with the node binary, so that the PID is the server's; loopback only.
const floorServer: ChildProcess = spawn(process.execPath, [bin.reactRouterServe, "build/floor/server/index.js"], {
  env: { ...process.env, NODE_ENV: "production", PORT: String(floorPort), HOST: "127.0.0.1" },
  stdio: ["ignore", "ignore", "inherit"],
});
const killFloorOnExit = () => floorServer.kill("SIGTERM");
process.once("exit", killFloorOnExit);
const floorSteps = new Map<number, Step>();
const floorShot = (index: number): Shot =>
  index % 2
    ? {
        kind: "floor action",
        send: async (signal) => {
          const response = await fetch(`${floorUrl}/echo`, {
            method: "POST",
            headers: { "Content-Type": "application/json" },
            body: JSON.stringify({ n: index }),
            signal,
          });
          await response.arrayBuffer();
          return { ok: response.ok, status: response.status };
        },
      }
    : {
        kind: "floor page",
        send: async (signal) => {
          const response = await fetch(`${floorUrl}/page`, { signal });
          await response.arrayBuffer();
          return { ok: response.ok, status: response.status };
        },
      };

/** The floor at `rate`, measured the first time a ladder reaches that rate (just before the app's step). */
async function floorAt(rate: number): Promise<Step> {
  let step = floorSteps.get(rate);
  if (!step) {
    step = await runStep(rate, floorShot);
    floorSteps.set(rate, step);
    printStep("floor", step, null);
  }
  return step;
}

// ── Printing ──────────────────────────────────────────────────────────────────────────────────────

const ms = (value: number) => (Number.isNaN(value) ? "–" : `${value.toFixed(value < 10 ? 1 : 0)} ms`);
const times = (value: number, floor: number) => (Number.isNaN(value) || Number.isNaN(floor) ? "" : `(${(value / floor).toFixed(1)}×)`);
const floorFor = (kind: Kind, floor: Step | null) =>
  floor ? figures(floor.samples.filter((sample) => sample.kind === (postKinds.has(kind) ? "floor action" : "floor page"))) : null;

function printStep(title: string, step: Step, floor: Step | null, notes: Partial<Record<Kind, string>> = {}) {
  const all = figures(step.samples);
  const base = floor ? figures(floor.samples) : null;
  console.log(
    `  ${title.padEnd(6)} ${String(step.rate).padStart(3)}/s  ${String(all.count).padStart(4)} sent  p50 ${ms(all.p50).padStart(7)} ${times(all.p50, base?.p50 ?? Number.NaN).padEnd(8)}` +
      ` p99 ${ms(all.p99).padStart(7)} ${times(all.p99, base?.p99 ?? Number.NaN).padEnd(8)} errors ${all.errors}` +
      `  [client: send lag p99 ${ms(step.sendLagP99)}, ${(step.clientCpu * 100).toFixed(0)} % of a core]  ${passes(step) ? "pass" : "FAIL"}`,
  );
  const kinds = [...new Set(step.samples.map((sample) => sample.kind))];
  if (kinds.length < 2 && !floor) return;
  for (const kind of kinds) {
    const own = figures(step.samples.filter((sample) => sample.kind === kind));
    const reference = floorFor(kind, floor);
    const extra = [
      own.conflicts ? `${own.conflicts} conflicts (answers)` : "",
      own.errors ? `failures: ${own.failures.join(", ")}` : "",
      notes[kind] ?? "",
    ].filter(Boolean);
    console.log(
      `      ${kind.padEnd(12)} ${String(own.count).padStart(4)}  p50 ${ms(own.p50).padStart(7)} ${times(own.p50, reference?.p50 ?? Number.NaN).padEnd(8)}` +
        ` p99 ${ms(own.p99).padStart(7)} ${times(own.p99, reference?.p99 ?? Number.NaN).padEnd(8)} errors ${own.errors}${extra.length ? `  ${extra.join("; ")}` : ""}`,
    );
  }
}

// ── The app and its class ─────────────────────────────────────────────────────────────────────────

const bench = await createBenchDatabase();
const { db } = await import("~/server/db.server");
const { loadMarkingLab } = await import("~/server/marking/marking-lab.server");
const { saveRubric } = await import("~/server/marking/rubrics.server");
type CourseAccess = import("~/server/auth/access.server").CourseAccess;

// One lab for each process count, so the second ladder meets the same data as the first did.
const { label, course, cohorts, labs, students, instructor, ta } = await seedDeadlineClass({
  students: STUDENTS,
  cohorts: COHORTS,
  labs: 2,
  dueInMs: 3_600_000,
});
const instructorAccess: CourseAccess = {
  user: {
    id: instructor.userId,
    email: `instructor@${label}.example`,
    name: "Bench instructor",
    mayCreateCourses: true,
    sessionId: null,
    via: "session",
  },
  course: { ...course, archivedAt: null },
  membership: { id: instructor.membershipId, role: "instructor", cohortId: null },
  cohortIds: cohorts.map((cohort) => cohort.id),
};
// The rubric the desk saves against: a levels criterion (the one the saves change), a range and two automatic rules.
for (const lab of labs)
  await saveRubric(db, {
    access: instructorAccess,
    lab: (await loadMarkingLab(db, course.id, lab.id))!,
    input: {
      criteria: [
        {
          kind: "levels",
          title: "Set-up",
          levels: [
            { points: 0, description: "None" },
            { points: 1, description: "Partly" },
            { points: 2, description: "Fully" },
          ],
        },
        { kind: "range", title: "Discussion", minPoints: 0, maxPoints: 4 },
        { kind: "auto", title: "Drops", rule: "required_drops", maxPoints: 2 },
        { kind: "auto", title: "Class", rule: "not_outlier", maxPoints: 2 },
      ],
    },
  });
const setUpCriterion = new Map(
  await Promise.all(labs.map(async (lab) => [lab.id, (await loadMarkingLab(db, course.id, lab.id))!.rubric[0].id] as const)),
);

type HandInRecord = { key: string; step: Step | null; retry: boolean; status: number; versionId: string | null };

/** Everything one ladder of the mix sends: its requests, made when due, and what the hand-ins were answered. */
function deadlineMix(server: AppServer, labId: string) {
  const { baseUrl } = server;
  const labPath = `/courses/${course.id}/labs/${labId}`;
  const random = seededRandom(20);
  const records: HandInRecord[] = [];
  const attempts = new Map<number, number>();
  const recent: { student: HandInStudent; key: string; drops: number[] }[] = [];
  const expectedVersion = new Map<string, number>();
  let counter = 0;
  let current: Step | null = null;

  const handIn = (student: HandInStudent, key: string, drops: number[], retry = false): Shot => ({
    kind: "hand-in",
    send: async (signal) => {
      const record: HandInRecord = { key, step: current, retry, status: 0, versionId: null };
      records.push(record);
      const answer = await postHandIn(baseUrl, { labId, student, key, drops, signal });
      Object.assign(record, { status: answer.status, versionId: answer.versionId });
      return { ok: answer.status === 200 || answer.status === 201, status: answer.status };
    },
  });
  const newHandIn = (student: HandInStudent): Shot => {
    const attempt = (attempts.get(student.index) ?? 0) + 1;
    attempts.set(student.index, attempt);
    const sent = { student, key: `${label}-${labId.slice(0, 8)}-${student.index}-${attempt}`, drops: dropTimes(student.index, attempt) };
    recent.push(sent);
    if (recent.length > 20) recent.shift();
    return handIn(sent.student, sent.key, sent.drops);
  };
  const page = (kind: AppKind, path: string, cookie: string): Shot => ({
    kind,
    send: async (signal) => {
      const response = await fetch(`${baseUrl}${path}`, { headers: { Cookie: cookie }, signal });
      await response.arrayBuffer();
      return { ok: response.ok, status: response.status };
    },
  });
  const deskSave = (student: HandInStudent): Shot => ({
    kind: "desk save",
    send: async (signal) => {
      // The version is read when the save is sent: a save sent before the last one was answered may conflict, as in a browser.
      const body = {
        intent: "save",
        membershipId: student.membershipId,
        expectedVersion: expectedVersion.get(student.membershipId) ?? 0,
        change: { kind: "score", criterionId: setUpCriterion.get(labId), level: 1 + (counter % 3) },
      };
      // As the desk's fetcher posts it: React Router's single fetch, the route's address with .data, a JSON body.
      const response = await fetch(`${baseUrl}${labPath}/marking.data`, {
        method: "POST",
        headers: { Cookie: ta.cookie, Origin: baseUrl, "Content-Type": "application/json" },
        body: JSON.stringify(body),
        signal,
      });
      // Read to the end before decoding, so that a timeout fails this request rather than the decoder's own promises.
      const bytes = await response.arrayBuffer();
      if (!response.ok) return { ok: response.status === 409, status: response.status, conflict: response.status === 409 };
      const decoded = await decodeViaTurboStream(new Blob([bytes]).stream(), globalThis);
      await decoded.done;
      const answer = (decoded.value as { data?: { status?: string; row?: { expectedVersion: number } } }).data;
      if (answer?.row) expectedVersion.set(student.membershipId, answer.row.expectedVersion);
      const ok = answer?.status === "saved" || answer?.status === "conflict";
      return { ok, status: ok ? response.status : 422, conflict: answer?.status === "conflict" };
    },
  });

  // Smooth weighted round robin: every 20 requests hold the mix's shares exactly, interleaved, so
  // that even a short step has its 40 % of hand-ins; the students are drawn at random.
  const credit = MIX.map(() => 0);
  let handIns = 0;
  /** The next request of the mix. */
  const next = (): Shot => {
    counter++;
    MIX.forEach((entry, index) => (credit[index] += entry.share));
    const chosen = credit.indexOf(Math.max(...credit));
    credit[chosen] -= 1;
    const kind = MIX[chosen].kind;
    const student = students[Math.floor(random() * students.length)];
    if (kind === "hand-in") {
      handIns++;
      // Exactly RETRY_SHARE of the hand-ins, spread evenly: those where the running count of retries steps up.
      const retry = recent.length > 0 && Math.floor(handIns * RETRY_SHARE) > Math.floor((handIns - 1) * RETRY_SHARE);
      if (!retry) return newHandIn(student);
      const earlier = recent[Math.floor(random() * recent.length)];
      return handIn(earlier.student, earlier.key, earlier.drops, true);
    }
    if (kind === "lab page") return page(kind, labPath, student.cookie);
    if (kind === "comparison") return page(kind, `${labPath}/comparison`, instructor.cookie);
    // The TA marks those who handed in before the rush, card by card.
    return deskSave(students[counter % HANDED_IN_BEFORE]);
  };
  const labPages = (): Shot => page("lab page", labPath, students[Math.floor(random() * students.length)].cookie);

  /** What the step's hand-ins were answered. */
  const handInNotes = (step: Step) => {
    const mine = records.filter((record) => record.step === step);
    const count = (status: number) => mine.filter((record) => record.status === status).length;
    return `${mine.filter((record) => record.retry).length} retries; ${count(201)} new versions (201), ${count(200)} repeats (200)`;
  };

  return {
    next,
    labPages,
    records,
    newHandIn,
    handInNotes,
    setStep: (step: Step | null) => (current = step),
  };
}

/** Runs `rates` up with `measure` until two steps in a row fail, or the run's deadline comes near. */
async function ladder(title: string, rates: number[], measure: (rate: number) => Promise<Step>): Promise<{ steps: Step[]; cut: boolean }> {
  console.log(`\n${title} (${elapsed()})`);
  const steps: Step[] = [];
  let failedInARow = 0;
  for (const rate of rates) {
    if (Date.now() + 2 * STEP_SECONDS * 1000 > runDeadline) {
      console.log(`  (stopped before ${rate}/s: the run's ${OVERALL_DEADLINE_MS / 60_000}-minute bound)`);
      return { steps, cut: true };
    }
    const step = await measure(rate);
    steps.push(step);
    failedInARow = passes(step) ? 0 : failedInARow + 1;
    if (failedInARow >= FAILED_STEPS_TO_STOP) break;
    // A moment for the server to finish what an overloaded step left it (the client gave up on those requests).
    await sleep(1_000);
  }
  await sleep(2_000);
  return { steps, cut: false };
}

/** A step of the app at `rate`, just after the floor's at the same rate (measured once per rate). */
function appStep(
  next: () => Shot,
  { onStep, notes }: { onStep?: (step: Step) => void; notes?: (step: Step) => Partial<Record<Kind, string>> } = {},
) {
  return async (rate: number): Promise<Step> => {
    const floor = await floorAt(rate);
    const step: Step = { rate, samples: [], sendLagP99: 0, clientCpu: 0, seconds: 0 };
    onStep?.(step);
    Object.assign(step, await runStep(rate, next));
    printStep("app", step, floor, notes?.(step));
    return step;
  };
}

/** Every hand-in answered 200 or 201 stored exactly once, and every answer for a key naming the same version: the lost (or doubled) ones by step. */
async function lostHandIns(labId: string, records: HandInRecord[]): Promise<Map<Step | null, number>> {
  const versions = await storedVersions(labId);
  const byKey = new Map<string, string[]>();
  for (const version of versions) byKey.set(version.idempotencyKey, [...(byKey.get(version.idempotencyKey) ?? []), version.id]);
  const lost = new Map<Step | null, number>();
  for (const record of records) {
    if (record.status !== 200 && record.status !== 201) continue;
    const stored = byKey.get(record.key) ?? [];
    if (stored.length !== 1 || stored[0] !== record.versionId) lost.set(record.step, (lost.get(record.step) ?? 0) + 1);
  }
  const keys = new Set(records.map((record) => record.key));
  const doubled = [...keys].filter((key) => (byKey.get(key)?.length ?? 0) > 1).length;
  const answered = records.filter((record) => record.status === 200 || record.status === 201);
  console.log(
    `  hand-ins: ${answered.length} answered 200/201 for ${keys.size} keys; ${versions.length} versions stored in the lab; ` +
      `${[...lost.values()].reduce((sum, n) => sum + n, 0)} lost or not matching their answer; ${doubled} keys with a second version`,
  );
  return lost;
}

type Result = { title: string; steps: Step[]; cut: boolean; lost: Map<Step | null, number>; records: HandInRecord[] };
const sustainable = (result: Result) =>
  result.steps
    .filter((step) => passes(step) && !result.lost.get(step))
    .reduce<Step | null>((best, step) => (!best || step.rate > best.rate ? step : best), null);

console.log(`The class seeded: ${STUDENTS} students in ${COHORTS} cohorts, two labs with a rubric (${elapsed()})`);
const results: Result[] = [];
let failed = false;
// The last guard of the bound: should a request hang past every timeout, stop (the exit handlers stop the
// servers), dropping the bench database if that still works within a few seconds.
setTimeout(() => {
  console.error("bench:load ran a minute and a half past its bound: stopping.");
  void Promise.race([bench.drop(), sleep(10_000)]).finally(() => process.exit(2));
}, OVERALL_DEADLINE_MS + 90_000).unref();
try {
  await waitForHealth(floorUrl, floorServer, "/page");
  // Warm the floor up as the app is below: its first requests compile the server's code.
  await runStep(20, floorShot, WARM_UP_SECONDS);
  await ladder("The floor alone, to its ceiling", FLOOR_RATES, floorAt);

  for (const [index, processes] of [1, 2].entries()) {
    const lab = labs[index];
    console.log(`\nStarting the app with WEB_CONCURRENCY=${processes} (${elapsed()})`);
    const server = await startAppServer(bench.url, { environment: { WEB_CONCURRENCY: String(processes) } });
    try {
      const mix = deadlineMix(server, lab.id);
      // Before the rush: half the class has handed in once (through the app, which warms it up too),
      // then a few of each request of the mix.
      for (let from = 0; from < HANDED_IN_BEFORE; from += 10) {
        const answers = await Promise.all(
          students.slice(from, from + 10).map((student) => mix.newHandIn(student).send(AbortSignal.timeout(30_000))),
        );
        const refused = answers.find((answer) => !answer.ok);
        if (refused) throw new Error(`A hand-in before the rush was answered ${refused.status}`);
      }
      console.log(`  ${HANDED_IN_BEFORE} hand-ins before the rush done (${elapsed()}); warming up`);
      await runStep(10, mix.next, WARM_UP_SECONDS);
      const plural = processes === 1 ? "process" : "processes";

      const mixTitle = `Deadline mix, WEB_CONCURRENCY=${processes} (hand-ins ${MIX[0].share * 100} %, ${RETRY_SHARE * 100} % of them retries; lab pages ${MIX[1].share * 100} %; desk saves ${MIX[2].share * 100} %; comparison ${MIX[3].share * 100} %)`;
      const mixRun = await ladder(
        mixTitle,
        RATES,
        appStep(mix.next, { onStep: mix.setStep, notes: (step) => ({ "hand-in": mix.handInNotes(step) }) }),
      );
      mix.setStep(null);
      const lost = await lostHandIns(lab.id, mix.records);
      if (lost.size) failed = true;
      results.push({ title: `deadline mix, ${processes} ${plural}`, ...mixRun, lost, records: mix.records });

      const pageRun = await ladder(`Lab pages only, WEB_CONCURRENCY=${processes}`, RATES, appStep(mix.labPages));
      results.push({ title: `lab pages only, ${processes} ${plural}`, ...pageRun, lost: new Map(), records: [] });
    } finally {
      await server.stop();
    }
  }

  console.log(`\nHighest sustainable rate (p99 < ${P99_BUDGET_MS} ms, no errors, no lost hand-in), ${STEP_SECONDS} s steps:`);
  const floorPassing = [...floorSteps.values()].filter(passes).map((step) => step.rate);
  const floorBest = Math.max(...floorPassing, 0);
  const floorTop = Math.max(...floorSteps.keys());
  const floorText = floorBest === floorTop ? `≥ ${floorBest}/s (it passed every rate it was run at)` : `${floorBest}/s`;
  console.log(`  floor (half page, half action): ${floorText}`);
  for (const result of results) {
    const best = sustainable(result);
    const handIns = best?.samples.filter((sample) => sample.kind === "hand-in" && sample.ok).length ?? 0;
    const created = result.records.filter((record) => record.step === best && record.status === 201).length;
    const all = best ? figures(best.samples) : null;
    const rate = best ? `${best.rate}/s` : "none: no step passed";
    const topped =
      best && best === result.steps.at(-1) && (result.cut || best.rate === RATES.at(-1)) ? " (the ladder stopped above it: at least)" : "";
    console.log(
      `  ${result.title.padEnd(30)} ${rate}${topped}` +
        (best
          ? `  ${(best.rate / floorBest).toFixed(2)}× the floor's rate${floorBest === floorTop ? " (at most)" : ""}; p99 ${ms(all!.p99)}` +
            (handIns
              ? `; inside the mix hand-ins answered ${(handIns / best.seconds).toFixed(1)}/s, ${(created / best.seconds).toFixed(1)} new versions/s`
              : "")
          : ""),
    );
  }
  // The mix's p99 is its slowest requests': say how far each kind of request held on its own inside the mix.
  for (const result of results.filter((candidate) => candidate.records.length)) {
    const byKind = MIX.map(({ kind }) => {
      const held = result.steps.filter((step) => {
        const own = figures(step.samples.filter((sample) => sample.kind === kind));
        return own.errors === 0 && own.p99 < P99_BUDGET_MS && !(kind === "hand-in" && result.lost.get(step));
      });
      return `${kind} ${held.length ? `${Math.max(...held.map((step) => step.rate))}/s` : "none"}`;
    });
    console.log(
      `  ${result.title}, the highest mix rate at which each kind held p99 < ${P99_BUDGET_MS} ms with no error: ${byKind.join(", ")}`,
    );
  }
  const pageRate = (processes: number) =>
    sustainable(results.find((result) => result.title === `lab pages only, ${processes} ${processes === 1 ? "process" : "processes"}`)!)
      ?.rate;
  const [one, two] = [pageRate(1), pageRate(2)];
  console.log(
    one && two
      ? `  lab pages, 2 processes over 1: ${(two / one).toFixed(2)}× (goal ≥ 1.6×)`
      : "  lab pages, 2 processes over 1: not measurable (a ladder had no passing step)",
  );
} finally {
  process.off("exit", killFloorOnExit);
  const exited = new Promise((resolve) => (floorServer.exitCode !== null ? resolve(null) : floorServer.once("exit", resolve)));
  floorServer.kill("SIGTERM");
  await exited;
  await bench.drop();
}
if (failed) process.exitCode = 1;
