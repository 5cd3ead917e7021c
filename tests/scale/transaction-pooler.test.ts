/**
 * Scale-out behind a transaction pooler (README, "Deploying it"): PgBouncer in transaction mode in
 * front of this file's copy of the migrated test database, and the production build run as a
 * deployment with two web replicas and two workers runs it, every one of them (and this file's own
 * database client) connecting through PgBouncer. Only the release step connects directly
 * (DATABASE_DIRECT_URL). A deadline's burst of hand-ins goes to both web processes at once, each
 * answer retried on the other process with its Idempotency-Key while the first is still under way,
 * some followed by a corrected version; then the class is marked and its marks released through the
 * pages, and the two workers compete for the e-mail. Nothing may be lost or stored twice.
 *
 * scripts/test.ts builds production into PRODUCTION_CHECK_DIRECTORY before this file runs (and
 * `npm run test:scale` does too). Loopback only; every process started here is stopped in afterAll,
 * and killed if this process exits first.
 */
import { execFile, spawn, type ChildProcess } from "node:child_process";
import { randomUUID } from "node:crypto";
import { existsSync } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { dropTimes } from "../support/drop-times";
import type { HandInClass, HandInStudent } from "../support/hand-in-class";
import { PRODUCTION_CHECK_DIRECTORY } from "../../scripts/lib/build";
import { type PgBouncer, ensurePgBouncer, startPgBouncer } from "../../scripts/lib/pgbouncer";
import { freePort, waitForHealth } from "../support/app-server";
import { createTestDatabase, dropTestDatabase } from "../support/test-database";

const STUDENTS = 150;
/** Server connections PgBouncer keeps to the database: far fewer than the processes' pools hold clients. */
const SERVER_CONNECTIONS = 8;
/** The bound on every wait below: a request, a process coming up. */
const WAIT_MS = 90_000;
/** The bound on the two workers' delivering every e-mail (half a minute on a busy two-core machine). */
const EMAIL_WAIT_MS = 150_000;

const execute = promisify(execFile);
const entry = (name: string) => path.join(PRODUCTION_CHECK_DIRECTORY, `${name}.js`);

// App modules read DATABASE_URL when first imported: they are imported once it names the pooler.
type App = {
  db: typeof import("~/server/db.server").db;
  pool: typeof import("~/server/db.server").pool;
  schema: typeof import("~/db/schema");
  orm: typeof import("drizzle-orm");
  consume: typeof import("~/server/auth/rate-limit.server").consume;
  handInClass: typeof import("../support/hand-in-class");
};
let app: App;
let databaseUrl: string;
let bouncer: PgBouncer | undefined;
let appUrl: string;
let webs: string[] = [];
let klass: HandInClass;
let release: { stdout: string; locksLeft: unknown[] };
const services: { name: string; child: ChildProcess; output: string }[] = [];
const cleanups: (() => Promise<unknown>)[] = [];

// Should this process die before afterAll, no server it started outlives it.
const killServices = () => services.forEach(({ child }) => child.kill("SIGKILL"));
process.once("exit", killServices);

function startService(name: string, env: NodeJS.ProcessEnv): (typeof services)[number] {
  // The node binary itself, not npm, so that the PID we hold is the process's own and we can stop it.
  const child = spawn(process.execPath, [entry(name.replace(/-.*/, ""))], { env, stdio: ["ignore", "pipe", "pipe"] });
  const service = { name, child, output: "" };
  for (const stream of [child.stdout, child.stderr]) {
    stream.setEncoding("utf8");
    stream.on("data", (chunk: string) => (service.output += chunk));
  }
  services.push(service);
  return service;
}

async function stopService({ child }: (typeof services)[number]): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise((resolve) => child.once("exit", resolve));
  child.kill("SIGTERM");
  const timer = setTimeout(() => child.kill("SIGKILL"), 10_000);
  await exited;
  clearTimeout(timer);
}

/** Node 20 has no Map.groupBy. */
function groupBy<T>(items: T[], key: (item: T) => string): Map<string, T[]> {
  const groups = new Map<string, T[]>();
  for (const item of items) groups.set(key(item), [...(groups.get(key(item)) ?? []), item]);
  return groups;
}

async function until<T>(check: () => Promise<T | undefined | null | false>, what: string, timeoutMs = WAIT_MS): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const result = await check();
    if (result) return result;
    if (Date.now() > deadline) throw new Error(`Timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
}

beforeAll(async () => {
  if (!existsSync(entry("web"))) throw new Error(`Build production into ${PRODUCTION_CHECK_DIRECTORY} first (npm run test:scale does).`);
  ensurePgBouncer();
  databaseUrl = await createTestDatabase("scale");
  cleanups.push(() => dropTestDatabase(databaseUrl));
  bouncer = await startPgBouncer({ serverUrl: databaseUrl, port: await freePort(), serverConnections: SERVER_CONNECTIONS });
  cleanups.push(() => bouncer!.stop());
  const pooledUrl = bouncer.urlFor(databaseUrl);
  process.env.DATABASE_URL = pooledUrl;
  // Drizzle's named statements (where the app prepares them) stay off behind PgBouncer before 1.21.
  process.env.DATABASE_PREPARED_STATEMENTS = "off";
  const dbModule = await import("~/server/db.server");
  app = {
    db: dbModule.db,
    pool: dbModule.pool,
    schema: await import("~/db/schema"),
    orm: await import("drizzle-orm"),
    consume: (await import("~/server/auth/rate-limit.server")).consume,
    handInClass: await import("../support/hand-in-class"),
  };
  cleanups.push(async () => {
    await dbModule.pool.end();
    (globalThis as { benchpostPool?: unknown }).benchpostPool = undefined;
  });

  const storage = await mkdtemp(path.join(tmpdir(), "benchpost-scale-"));
  cleanups.push(() => rm(storage, { recursive: true, force: true }));
  const { FAKE_S3_BUCKET, startFakeS3 } = await import("~/server/storage/fake-s3.server");
  const s3 = await startFakeS3({ port: 0, directory: storage, bucket: FAKE_S3_BUCKET });
  cleanups.push(() => s3.close());
  const { startMailCatcher } = await import("~/server/email/mail-catcher.server");
  const catcher = await startMailCatcher({ connectionString: pooledUrl, port: 0, log: () => undefined });
  cleanups.push(() => catcher.close());

  const ports = [await freePort(), await freePort()];
  webs = ports.map((port) => `http://127.0.0.1:${port}`);
  // One public address for both replicas, as behind a load balancer: forms are checked against it.
  appUrl = webs[0];
  const env: NodeJS.ProcessEnv = {
    PATH: process.env.PATH,
    NODE_ENV: "production",
    HOST: "127.0.0.1",
    APP_URL: appUrl,
    TRUST_PROXY: "0",
    DATABASE_URL: pooledUrl,
    DATABASE_PREPARED_STATEMENTS: "off",
    SMTP_URL: `smtp://127.0.0.1:${catcher.port}`,
    ...s3.environment,
    WEB_CONCURRENCY: "1",
  };

  // The release step, told the pooler as DATABASE_URL, as a deployment's environment would be.
  const migrated = await execute(process.execPath, [entry("migrate")], {
    env: { ...env, DATABASE_DIRECT_URL: databaseUrl },
    timeout: WAIT_MS,
    encoding: "utf8",
  });
  // Nothing else uses this database yet: an advisory lock now would be the release step's, left behind.
  // Raw: pg_locks is a system view.
  const locks = await app.db.execute(
    app.orm
      .sql`select l.pid, l.objid from pg_locks l join pg_database d on d.oid = l.database where l.locktype = 'advisory' and d.datname = current_database()`,
  );
  release = { stdout: migrated.stdout.trim(), locksLeft: locks.rows };

  klass = await app.handInClass.seedHandInClass(app.db, { students: STUDENTS, label: `scale-${randomUUID().slice(0, 8)}` });

  const workers = ["worker-a", "worker-b"].map((name) => startService(name, env));
  const webServices = ports.map((port, index) => startService(`web-${"ab"[index]}`, { ...env, PORT: String(port) }));
  await Promise.all(webServices.map((service, index) => waitForHealth(webs[index], service.child)));
  await until(async () => workers.every((worker) => worker.output.includes("Worker running")), "both workers to start");
});

afterEach(({ task }) => {
  if (task.result?.state !== "fail") return;
  for (const { name, output } of services) console.error(`--- ${name}\n${output.slice(-20_000)}`);
  console.error(`--- pgbouncer\n${bouncer?.output().slice(-20_000)}`);
});

afterAll(async () => {
  // Each step runs even when one before it fails: the processes first, then what they used.
  const failures: unknown[] = [];
  for (const stop of [...services.map((service) => () => stopService(service)), ...cleanups.reverse()]) {
    await stop().catch((error: unknown) => failures.push(error));
  }
  process.off("exit", killServices);
  if (failures.length) throw failures[0];
});

type Outcome = { student: number; key: string; status: number; versionId: string | null; duplicate: boolean | null; error: string | null };

async function handIn(web: string, student: HandInStudent, key: string, drops: number[]): Promise<Outcome> {
  const response = await fetch(`${web}/api/v1/labs/${klass.labId}/drop-logs`, {
    method: "POST",
    headers: { Cookie: student.cookie, Origin: appUrl, "Content-Type": "application/json", "Idempotency-Key": key },
    body: JSON.stringify({ sphereId: student.sphereId, temperatureC: 21.5, drops }),
    signal: AbortSignal.timeout(WAIT_MS),
  });
  const body = (await response.json().catch(() => null)) as {
    version?: { id: string };
    duplicate?: boolean;
    error?: { code: string };
  } | null;
  return {
    student: student.index,
    key,
    status: response.status,
    versionId: body?.version?.id ?? null,
    duplicate: body?.duplicate ?? null,
    error: body?.error?.code ?? null,
  };
}

/** A hand-in's Idempotency-Key (at least eight characters): its student's first answer (a) or the corrected one (b). */
const keyOf = (student: HandInStudent, answer: "a" | "b") => `scale-${student.index}-${answer}`;

/** Every third student hands in a corrected second version. */
const correcting = (student: HandInStudent) => student.index % 3 === 0;

describe("behind PgBouncer in transaction mode", () => {
  it("runs the release step on its direct address, leaving no session lock on the pooler's connections", () => {
    expect(release.stdout).toBe("Database migrated.");
    expect(release.locksLeft).toEqual([]);
  });

  it("keeps attempt limits through the pooler: the limiter's statements are not named", async () => {
    // Concurrent, so that the pool's clients meet other server connections than the ones they prepared on.
    const checks = await Promise.allSettled(Array.from({ length: 40 }, (_, index) => app.consume("photo-upload", `scale-${index % 13}`)));
    expect(checks.filter((check) => check.status === "rejected").map((check) => String(check.reason))).toEqual([]);
    expect(checks.map((check) => check.status === "fulfilled" && check.value.limited)).not.toContain(true);
  });

  it("stores every hand-in of a burst across both web processes exactly once, with versions numbered without gaps", async () => {
    let maxClients = 0;
    let sampling = true;
    const sampler = (async () => {
      while (sampling) {
        const clients = await bouncer!.show("SHOW CLIENTS");
        maxClients = Math.max(maxClients, clients.filter((client) => client.database !== "pgbouncer").length);
        await new Promise((resolve) => setTimeout(resolve, 250));
      }
    })();
    const outcomes: Outcome[] = [];
    try {
      await Promise.all(
        klass.students.map(async (student) => {
          const [first, other] = [webs[student.index % 2], webs[(student.index + 1) % 2]];
          const drops = dropTimes(student.index);
          const key = keyOf(student, "a");
          // An answer lost on the way back: the phone sends again, to whichever replica, before the first is done.
          outcomes.push(...(await Promise.all([handIn(first, student, key, drops), handIn(other, student, key, drops)])));
          if (correcting(student)) {
            const corrected = drops.map((time) => Number((time + 0.02).toFixed(2)));
            outcomes.push(await handIn(other, student, keyOf(student, "b"), corrected));
            outcomes.push(await handIn(first, student, keyOf(student, "b"), corrected));
          }
        }),
      );
    } finally {
      sampling = false;
      await sampler;
    }

    expect(outcomes.filter((outcome) => outcome.status !== 201 && outcome.status !== 200)).toEqual([]);
    const keys = groupBy(outcomes, (outcome) => `${outcome.student}/${outcome.key}`);
    const correctingCount = klass.students.filter(correcting).length;
    expect(keys.size).toBe(STUDENTS + correctingCount);
    for (const answers of keys.values()) {
      // One stored version per key, and every repeat answered with it.
      expect(answers.map((answer) => answer.status).sort()).toEqual([200, 201]);
      expect(answers.find((answer) => answer.status === 200)).toMatchObject({ duplicate: true, versionId: answers[0].versionId });
    }

    const { dropLogs, dropLogVersions } = app.schema;
    const { eq } = app.orm;
    const stored = await app.db
      .select({
        id: dropLogVersions.id,
        version: dropLogVersions.version,
        membershipId: dropLogs.membershipId,
        key: dropLogVersions.idempotencyKey,
      })
      .from(dropLogVersions)
      .innerJoin(dropLogs, eq(dropLogs.id, dropLogVersions.dropLogId))
      .where(eq(dropLogs.labId, klass.labId));
    const accepted = outcomes.filter((outcome) => outcome.status === 201);
    expect(stored.map((row) => row.id).sort()).toEqual(accepted.map((outcome) => outcome.versionId).sort());
    const byStudent = groupBy(stored, (row) => row.membershipId);
    expect(byStudent.size).toBe(STUDENTS);
    for (const student of klass.students) {
      const versions = byStudent.get(student.membershipId)!;
      expect(versions.map((row) => row.version).sort()).toEqual(correcting(student) ? [1, 2] : [1]);
      expect(versions.find((row) => row.version === 1)?.key).toBe(keyOf(student, "a"));
    }

    // The processes' clients shared PgBouncer's few server connections, one transaction at a time.
    expect(maxClients).toBeGreaterThan(SERVER_CONNECTIONS);
    const [pool] = (await bouncer!.show("SHOW POOLS")).filter((row) => row.database === new URL(databaseUrl).pathname.slice(1));
    expect(pool).toMatchObject({ pool_mode: "transaction" });
  });

  it("releases the marks given at the marking desk, through both web processes", async () => {
    const { rubricCriteria, marks } = app.schema;
    const { and, eq, isNotNull } = app.orm;
    const [criterion] = await app.db
      .insert(rubricCriteria)
      .values({
        labId: klass.labId,
        position: 0,
        title: "Set-up",
        kind: "levels",
        levels: [
          { points: 0, description: "Not shown" },
          { points: 2, description: "Shown in the photos" },
        ],
        minPoints: 0,
        maxPoints: 2,
      })
      .returning();
    const page = (web: string, name: "marking" | "moderation") => `${web}/courses/${klass.courseId}/labs/${klass.labId}/${name}`;
    const headers = { Cookie: klass.instructor.cookie, Origin: appUrl };
    const marked = await fetch(page(webs[0], "marking"), {
      method: "POST",
      headers: { ...headers, "Content-Type": "application/json" },
      body: JSON.stringify({
        intent: "bulk",
        // Every hand-in the desk shows for the criterion, on all its pages: the class.
        selection: { criterionId: criterion.id, cohortId: null, status: null, all: true, bands: [], ids: [], except: [] },
        change: { kind: "score", criterionId: criterion.id, level: 2 },
      }),
      signal: AbortSignal.timeout(WAIT_MS),
    });
    expect(marked.status).toBe(200);
    const moderate = (web: string, form: Record<string, string>) =>
      fetch(page(web, "moderation"), { method: "POST", headers, body: new URLSearchParams(form), signal: AbortSignal.timeout(WAIT_MS) });
    expect((await moderate(webs[1], { intent: "ready" })).status).toBe(200);
    // Released while the lab is still open (it is due in minutes), as the instructor confirms.
    expect((await moderate(webs[0], { intent: "release", scope: "marked", whileOpen: "on" })).status).toBe(200);

    const released = await app.db
      .select({ membershipId: marks.membershipId, total: marks.total })
      .from(marks)
      .where(and(eq(marks.labId, klass.labId), isNotNull(marks.releasedAt)));
    expect(released.map((mark) => mark.membershipId).sort()).toEqual(klass.students.map((student) => student.membershipId).sort());
    expect(new Set(released.map((mark) => mark.total))).toEqual(new Set([2]));
  });

  it("delivers every receipt and release e-mail exactly once, the two workers sharing the jobs", async () => {
    const { emailOutbox, caughtEmails } = app.schema;
    const { eq } = app.orm;
    const outbox = await app.db
      .select({ id: emailOutbox.id, template: emailOutbox.template, to: emailOutbox.toAddress, status: emailOutbox.status })
      .from(emailOutbox)
      .where(eq(emailOutbox.courseId, klass.courseId));
    const correctingCount = klass.students.filter(correcting).length;
    expect(outbox.filter((row) => row.template === "hand-in-receipt")).toHaveLength(STUDENTS + correctingCount);
    expect(outbox.filter((row) => row.template === "marks-released")).toHaveLength(STUDENTS);

    const expected = new Set(outbox.map((row) => row.id));
    // The Message-ID is the outbox row's id (app/server/email/email-transport.server.ts).
    const outboxIdOf = (messageId: string | null) => messageId?.match(/^<([0-9a-f-]{36})@/)?.[1] ?? String(messageId);
    const workers = services.filter((service) => service.name.startsWith("worker"));
    const deliveredBy = () =>
      workers.map((worker) => [...worker.output.matchAll(/e-mail ([0-9a-f-]{36}): sent via/g)].map((match) => match[1]));
    // Done when every row says sent and both workers have logged what they delivered (the catcher stores a
    // message before the worker hears it was taken); what arrived twice would be here by then as well.
    const caught = await until(
      async () => {
        const statuses = await app.db
          .select({ status: emailOutbox.status })
          .from(emailOutbox)
          .where(eq(emailOutbox.courseId, klass.courseId));
        if (statuses.some((row) => row.status !== "sent") || deliveredBy().flat().length < expected.size) return null;
        return app.db
          .select({ messageId: caughtEmails.messageId, to: caughtEmails.toAddresses, subject: caughtEmails.subject })
          .from(caughtEmails);
      },
      `${expected.size} e-mails sent`,
      EMAIL_WAIT_MS,
    );
    // A copy sent twice arrives with the same Message-ID.
    const copies = groupBy(caught, (row) => outboxIdOf(row.messageId));
    expect([...copies].filter(([, rows]) => rows.length > 1).map(([id]) => id)).toEqual([]);
    expect([...copies.keys()].filter((id) => !expected.has(id))).toEqual([]);

    // Per student: a receipt for each version, one release e-mail.
    const byRecipient = groupBy(caught, (row) => row.to.join(","));
    for (const student of klass.students) {
      const subjects = (byRecipient.get(student.email) ?? []).map((row) => row.subject).sort();
      const receipts = correcting(student) ? [1, 2] : [1];
      expect(subjects).toEqual(
        [
          ...receipts.map((version) => `Receipt: Drag on a settling sphere, version ${version} handed in`),
          "Your mark for Drag on a settling sphere is ready",
        ].sort(),
      );
    }
    expect(deliveredBy().map((ids) => ids.length > 0)).toEqual([true, true]);
    expect(deliveredBy().flat().sort()).toEqual([...expected].sort());
  });
});
