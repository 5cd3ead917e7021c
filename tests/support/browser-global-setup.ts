/**
 * Before the browser suite: a fresh database with the demo scenario, and the built app served from
 * it on a free loopback port, with the mail catcher, the fake carrier and the worker beside it. The suite reads the
 * address with `inject("baseUrl")`, and the mail the app sent at `/api/dev/emails?to=…`.
 */
import { spawn } from "node:child_process";
import { existsSync } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import type { TestProject } from "vitest/node";
import { createDatabase, createPool } from "~/server/db.server";
import { startMailCatcher } from "~/server/email/mail-catcher.server";
import { migrateDatabase } from "~/server/migrate.server";
import { FAKE_CARRIER_API_KEY, startFakeCarrier } from "~/server/shipping/fake-carrier.server";
import { FAKE_S3_BUCKET, startFakeS3 } from "~/server/storage/fake-s3.server";
import { seedDemo } from "../../seeds/seed-demo";
import { ensureChromium } from "../../scripts/lib/chromium";
import { freePort, waitForHealth } from "./app-server";
import { createTestDatabase, dropTestDatabase } from "./test-database";

declare module "vitest" {
  export interface ProvidedContext {
    baseUrl: string;
    databaseUrl: string;
  }
}

export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  if (!existsSync("build/web.js")) throw new Error("Build the demo first (npm test does, or npm run build:demo): build/web.js is missing.");
  ensureChromium();
  const databaseUrl = await createTestDatabase("browser");
  await migrateDatabase(databaseUrl);
  const pool = createPool(databaseUrl);
  await seedDemo(createDatabase(pool));
  await pool.end();

  const catcher = await startMailCatcher({ connectionString: databaseUrl, port: 0, log: () => undefined });
  const carrier = await startFakeCarrier({ port: 0, log: () => undefined });
  const s3Objects = await mkdtemp(path.join(tmpdir(), "benchpost-browser-s3-"));
  const s3 = await startFakeS3({ port: 0, directory: s3Objects, bucket: FAKE_S3_BUCKET });
  const port = await freePort();
  const baseUrl = `http://localhost:${port}`;
  // The demo build run as `npm start` runs it, each half with the node binary itself (not npx), so
  // that the PIDs we hold are the processes' own and we can stop them.
  const env = {
    ...process.env,
    NODE_ENV: "production",
    PORT: String(port),
    HOST: "127.0.0.1",
    APP_URL: baseUrl,
    TRUST_PROXY: "0",
    DATABASE_URL: databaseUrl,
    SMTP_URL: `smtp://127.0.0.1:${catcher.port}`,
    RESEND_API_KEY: "",
    CARRIER_API_URL: carrier.apiUrl,
    CARRIER_API_KEY: FAKE_CARRIER_API_KEY,
    ...s3.environment,
  };
  const worker = spawn(process.execPath, ["build/worker.js"], { env, stdio: ["ignore", "ignore", "inherit"] });
  const server = spawn(process.execPath, ["build/web.js"], { env, stdio: ["ignore", "ignore", "inherit"] });
  await waitForHealth(baseUrl, server);
  project.provide("baseUrl", baseUrl);
  project.provide("databaseUrl", databaseUrl);

  return async () => {
    for (const child of [server, worker]) {
      child.kill("SIGTERM");
      await new Promise((resolve) => (child.exitCode !== null ? resolve(null) : child.once("exit", resolve)));
    }
    await catcher.close();
    await carrier.close();
    await s3.close();
    await rm(s3Objects, { recursive: true, force: true });
    await dropTestDatabase(databaseUrl);
  };
}
