/**
 * The production build, run as a deployment runs it (README, "Run in production"). scripts/test.ts
 * builds it without the demo into PRODUCTION_CHECK_DIRECTORY just before this file runs. The release
 * step migrates this file's empty database (twice at once, as two instances would), then the web
 * server and the worker run with plain node and a production environment. Mail goes to a catcher of
 * this file's own and is read from its table: a production build has no inbox to read it from.
 */
import { execFile, spawn, type ChildProcess } from "node:child_process";
import { randomUUID } from "node:crypto";
import { existsSync } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { arrayContains, eq } from "drizzle-orm";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { caughtEmails, dropLogPhotos, dropLogVersions } from "~/db/schema";
import { db } from "~/server/db.server";
import { linksIn } from "~/server/email/dev-inbox.server";
import { type MailCatcher, startMailCatcher } from "~/server/email/mail-catcher.server";
import { FAKE_S3_BUCKET, startFakeS3 } from "~/server/storage/fake-s3.server";
import { PRODUCTION_CHECK_DIRECTORY } from "../../scripts/lib/build";
import { createAccessFixture } from "../support/access-fixture";
import { sessionCookieFor } from "../support/app-requests";
import { openBrowser } from "../support/browser";
import { freePort, waitForHealth } from "../support/app-server";
import { waitFor } from "../support/email";

const execute = promisify(execFile);
const entry = (name: string) => path.join(PRODUCTION_CHECK_DIRECTORY, `${name}.js`);
/** A production entry point run to its end with plain node, bounded in time. */
const runEntry = (name: string, args: string[], env: NodeJS.ProcessEnv) =>
  execute(process.execPath, [entry(name), ...args], { env, timeout: 60_000, encoding: "utf8" });

const instructorEmail = "ida.instructor@production.example";
let baseUrl: string;
let env: NodeJS.ProcessEnv;
let storage: string;
let catcher: MailCatcher;
let s3: Awaited<ReturnType<typeof startFakeS3>>;
const services: ChildProcess[] = [];
let output = "";

function startService(name: "web" | "worker"): ChildProcess {
  // The node binary itself, not npm, so that the PID we hold is the process's own and we can stop it.
  const child = spawn(process.execPath, [entry(name)], { env, stdio: ["ignore", "pipe", "pipe"] });
  // Kept quiet, and shown only when a test fails.
  for (const stream of [child.stdout, child.stderr]) {
    stream?.setEncoding("utf8");
    // Each line labelled with its process: pino may write several lines in one chunk.
    stream?.on(
      "data",
      (chunk: string) =>
        (output += chunk
          .split(/(?<=\n)/)
          .map((line) => `[${name}] ${line}`)
          .join("")),
    );
  }
  services.push(child);
  return child;
}

beforeAll(async () => {
  if (!existsSync(entry("web"))) throw new Error(`Build production into ${PRODUCTION_CHECK_DIRECTORY} first (npm test does).`);
  storage = await mkdtemp(path.join(tmpdir(), "benchpost-production-"));
  process.env.STORAGE_DIR = storage;
  const port = await freePort();
  baseUrl = `http://127.0.0.1:${port}`;
  // A catcher's port for SMTP_URL before it runs: it writes to tables the release step makes.
  const mailPort = await freePort();
  // Production keeps photos in S3-compatible storage only: here, the local fake.
  s3 = await startFakeS3({ port: 0, directory: storage, bucket: FAKE_S3_BUCKET });
  env = {
    PATH: process.env.PATH,
    NODE_ENV: "production",
    PORT: String(port),
    HOST: "127.0.0.1",
    APP_URL: baseUrl,
    TRUST_PROXY: "0",
    DATABASE_URL: process.env.DATABASE_URL,
    SMTP_URL: `smtp://127.0.0.1:${mailPort}`,
    ...s3.environment,
    // Every test below goes through two web processes behind one port, as a deployment runs them.
    WEB_CONCURRENCY: "2",
  };

  const releases = await Promise.all([runEntry("migrate", [], env), runEntry("migrate", [], env)]);
  expect(releases.map((release) => release.stdout.trim())).toEqual(["Database migrated.", "Database migrated."]);
  catcher = await startMailCatcher({ connectionString: process.env.DATABASE_URL!, port: mailPort, log: () => undefined });
  startService("worker");
  await waitForHealth(baseUrl, startService("web"));
});

afterEach(({ task }) => {
  if (task.result?.state === "fail") console.error(output);
});

afterAll(async () => {
  for (const child of services) {
    child.kill("SIGTERM");
    await new Promise((resolve) => (child.exitCode !== null || child.signalCode !== null ? resolve(null) : child.once("exit", resolve)));
  }
  await catcher?.close();
  await s3?.close();
  if (storage) await rm(storage, { recursive: true, force: true });
});

describe("the production build", () => {
  it("refuses to start without APP_URL, naming what is missing", async () => {
    const refused = await runEntry("web", [], { ...env, APP_URL: "" }).catch((error: { code: number; stderr: string }) => error);
    expect(refused).toMatchObject({ code: 1, stderr: expect.stringContaining("APP_URL: required in production") });
  });

  it("runs WEB_CONCURRENCY web processes behind one port, and replaces one that dies", async () => {
    const primary = services.find((child) => child.spawnargs.includes(entry("web")))!;
    const webProcesses = async () =>
      (await execute("ps", ["-o", "pid=", "--ppid", String(primary.pid)], { encoding: "utf8" })).stdout.trim().split(/\s+/).map(Number);
    const first = await webProcesses();
    expect(first).toHaveLength(2);

    process.kill(first[0], "SIGKILL");
    let now = first;
    for (let tries = 0; tries < 100 && (now.includes(first[0]) || now.length < 2); tries++) {
      await new Promise((resolve) => setTimeout(resolve, 100));
      now = await webProcesses().catch(() => []);
    }
    expect(now).toHaveLength(2);
    expect(now).not.toContain(first[0]);
    await waitForHealth(baseUrl, primary);
  });

  it("answers its health check", async () => {
    const response = await fetch(`${baseUrl}/healthz`);
    expect(response.status).toBe(200);
    expect(await response.json()).toMatchObject({ status: "ok", database: { status: "up" } });
  });

  it("has no development inbox, not even for this machine", async () => {
    expect((await fetch(`${baseUrl}/dev/inbox`)).status).toBe(404);
    expect((await fetch(`${baseUrl}/api/dev/emails?to=${instructorEmail}`)).status).toBe(404);
    // And in Chromium: the address opens the app's own "nothing here" page, not an inbox.
    const browser = await openBrowser();
    try {
      const page = await browser.context.newPage();
      const response = await page.goto(`${baseUrl}/dev/inbox`);
      expect(response?.status()).toBe(404);
      await expect(page.getByRole("heading", { level: 1 }).textContent()).resolves.toMatch(/nothing at this address/i);
      expect(await page.getByText(/inbox/i).count()).toBe(0);
    } finally {
      await browser.close();
    }
  });

  it("signs in an instructor made by create-instructor, with a link the worker mailed", async () => {
    const created = await runEntry("create-instructor", ["--email", instructorEmail, "--name", "Ida Instructor"], env);
    expect(created.stdout).toContain(`Created the instructor account ${instructorEmail}`);

    const asked = await fetch(`${baseUrl}/sign-in`, {
      method: "POST",
      headers: { Origin: baseUrl },
      body: new URLSearchParams({ intent: "link", email: instructorEmail }),
    });
    expect(asked.status).toBe(200);
    const message = await waitFor(
      async () =>
        (
          await db
            .select()
            .from(caughtEmails)
            .where(arrayContains(caughtEmails.toAddresses, [instructorEmail]))
        )[0],
      "the sign-in link",
    );
    const link = linksIn(message.text).find((url) => url.startsWith(`${baseUrl}/sign-in/link/`));
    expect(link, "a sign-in link on APP_URL").toBeDefined();

    const signedIn = await fetch(link!, { method: "POST", headers: { Origin: baseUrl }, redirect: "manual" });
    expect(signedIn.status).toBe(302);
    const cookie = signedIn.headers.getSetCookie()[0].split(";")[0];
    const me = await fetch(`${baseUrl}/api/v1/me`, { headers: { Cookie: cookie } });
    expect(me.status).toBe(200);
    expect(await me.json()).toMatchObject({ user: { email: instructorEmail, name: "Ida Instructor" } });
  });

  it("logs one JSON line per request with its id, keeps a proxy's id, and never logs a link's token", async () => {
    const fresh = await fetch(`${baseUrl}/healthz`);
    const ownId = fresh.headers.get("x-request-id")!;
    expect(ownId).toMatch(/^[0-9a-f-]{36}$/);
    const proxied = await fetch(`${baseUrl}/healthz`, { headers: { "X-Request-Id": "proxy-7f3a9c21" } });
    expect(proxied.headers.get("x-request-id")).toBe("proxy-7f3a9c21");
    // Text that is not an id is not written into the log.
    expect((await fetch(`${baseUrl}/healthz`, { headers: { "X-Request-Id": "not an id; <b>" } })).headers.get("x-request-id")).toMatch(
      /^[0-9a-f-]{36}$/,
    );
    await fetch(`${baseUrl}/reset-password/secret-token-123`);
    const lines = () =>
      output
        .split("\n")
        .filter((line) => line.startsWith("[web] {"))
        .flatMap((line) => {
          try {
            return [JSON.parse(line.slice("[web] ".length))];
          } catch {
            return []; // a line cut across two chunks
          }
        });
    await waitFor(async () => lines().some((line) => line.path === "/reset-password/:token"), "the request lines");
    expect(lines()).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ level: 30, msg: "request", requestId: ownId, method: "GET", path: "/healthz", status: 200 }),
        expect.objectContaining({ requestId: "proxy-7f3a9c21", path: "/healthz" }),
      ]),
    );
    expect(output).not.toContain("secret-token-123");
  });

  it("takes a student's hand-in through the API", async () => {
    const fixture = await createAccessFixture("production");
    const response = await fetch(`${baseUrl}/api/v1/labs/${fixture.labId}/drop-logs`, {
      method: "POST",
      headers: {
        Cookie: await sessionCookieFor(fixture.userIds.ownStudent),
        Origin: baseUrl,
        "Content-Type": "application/json",
        "Idempotency-Key": randomUUID(),
      },
      body: JSON.stringify({ sphereId: fixture.sphereId, temperatureC: 22, drops: [7.4, 7.5, 7.45, 7.52, 7.39] }),
    });
    expect(response.status).toBe(201);
    const { version } = (await response.json()) as { version: { id: string } };
    const stored = await db
      .select({ dropLogId: dropLogVersions.dropLogId })
      .from(dropLogVersions)
      .where(eq(dropLogVersions.id, version.id));
    expect(stored).toEqual([{ dropLogId: fixture.dropLogId }]);
  });

  it("keeps a student's photo in object storage, serves it back, and deletes the object when the draft lets it go", async () => {
    const fixture = await createAccessFixture("production-photos");
    const cookie = await sessionCookieFor(fixture.userIds.ownStudent);
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
    const form = new FormData();
    form.append("photo", new File([png], "set-up.png", { type: "image/png" }));
    const uploaded = await fetch(`${baseUrl}/courses/${fixture.courseId}/labs/${fixture.labId}/photos`, {
      method: "POST",
      headers: { Cookie: cookie, Origin: baseUrl },
      body: form,
    });
    expect(uploaded.status).toBe(200);
    const [photo] = await db.select().from(dropLogPhotos).where(eq(dropLogPhotos.originalName, "set-up.png"));
    // In the bucket, under the key the row names; nothing was written to the local disk.
    const object = await fetch(`${s3.endpoint}/${FAKE_S3_BUCKET}/${photo.storageKey}`);
    expect(new Uint8Array(await object.arrayBuffer())).toEqual(png);

    const served = await fetch(`${baseUrl}/courses/${fixture.courseId}/photos/${photo.id}`, { headers: { Cookie: cookie } });
    expect(served.headers.get("content-type")).toBe("image/png");
    expect(new Uint8Array(await served.arrayBuffer())).toEqual(png);

    const removed = await fetch(`${baseUrl}/courses/${fixture.courseId}/photos/${photo.id}`, {
      method: "POST",
      headers: { Cookie: cookie, Origin: baseUrl },
      body: new URLSearchParams({ intent: "remove" }),
    });
    expect(removed.status).toBe(200);
    expect((await fetch(`${s3.endpoint}/${FAKE_S3_BUCKET}/${photo.storageKey}`)).status).toBe(404);
    expect(await db.select().from(dropLogPhotos).where(eq(dropLogPhotos.id, photo.id))).toEqual([]);
  });
});
