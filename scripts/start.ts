/**
 * `npm start`: the demo, everything a newcomer needs to see Benchpost. Ensures the database, migrates,
 * seeds when empty, builds the demo (which has the development inbox), and runs the web server, the
 * worker, the mail catcher, the fake carrier and the fake S3 (photos) until Ctrl-C. It listens on 127.0.0.1 unless HOST says otherwise.
 * `npm run dev` is the same with Vite's dev server (hot reload) in place of the build.
 * Production is another path: `npm run build`, `npm run db:migrate`, `start:web`, `start:worker`.
 */
import { env } from "./lib/checked-environment";
import type { ChildProcess } from "node:child_process";
import { DEMO_PASSWORD, buildDemoScenario } from "../seeds/demo-scenario";
import { prepareDevelopmentDatabase } from "../seeds/seed-demo";
import { buildApp } from "./lib/build";
import { SetupError } from "./lib/postgres";
import { bin, portIsFree, startService } from "./lib/processes";
import { FAKE_CARRIER_API_KEY } from "~/server/shipping/fake-carrier.server";
import { FAKE_S3_BUCKET, FAKE_S3_CREDENTIALS } from "~/server/storage/fake-s3.server";

const development = process.argv.includes("--dev");
// Without a mail service of the user's, mail goes to the local catcher and can be read at /dev/inbox.
const catchesMail = !env.RESEND_API_KEY && !env.SMTP_URL;
// Without a carrier account of the user's, labels are bought from the local fake carrier.
const fakesCarrier = !env.CARRIER_API_KEY;
// Without a bucket of the user's, photos go to the local fake S3.
const fakesS3 = !env.S3_BUCKET;

async function prepare(): Promise<void> {
  if (!(await portIsFree(env.PORT, env.HOST)))
    throw new SetupError(`Port ${env.PORT} is already in use: stop what is running there, or set PORT.`);
  if (catchesMail && !(await portIsFree(env.MAIL_CATCHER_PORT, "127.0.0.1"))) {
    throw new SetupError(
      `Port ${env.MAIL_CATCHER_PORT} (the mail catcher) is already in use: stop what is running there, or set MAIL_CATCHER_PORT.`,
    );
  }
  if (fakesCarrier && !(await portIsFree(env.FAKE_CARRIER_PORT, "127.0.0.1"))) {
    throw new SetupError(
      `Port ${env.FAKE_CARRIER_PORT} (the fake carrier) is already in use: stop what is running there, or set FAKE_CARRIER_PORT.`,
    );
  }
  if (fakesS3 && !(await portIsFree(env.FAKE_S3_PORT, "127.0.0.1")))
    throw new SetupError(`Port ${env.FAKE_S3_PORT} (the fake S3) is already in use: stop what is running there, or set FAKE_S3_PORT.`);
  console.log(`Demo scenario: ${await prepareDevelopmentDatabase()}.`);
  if (!development) await buildApp({ demo: true });
}

function printWelcome(): void {
  const scenario = buildDemoScenario();
  const lines = [
    `Benchpost is running at ${env.APP_URL}`,
    env.HOST === "127.0.0.1"
      ? "It listens on 127.0.0.1 only: other machines cannot reach it (HOST=0.0.0.0 and APP_URL open it up)."
      : `It listens on ${env.HOST}.`,
    "",
    `Demo sign-ins (password for all: ${DEMO_PASSWORD}):`,
    `  instructor  ${scenario.instructor.email}`,
    ...scenario.tas.map((ta) => `  TA          ${ta.email}`),
    `  student     ${scenario.students[0].email} (and ${scenario.students.length - 1} more)`,
    "",
    catchesMail
      ? `E-mail is caught locally: read it at ${env.APP_URL}/dev/inbox (only from this machine).`
      : `E-mail goes out through ${env.RESEND_API_KEY ? "Resend" : env.SMTP_URL}.`,
    fakesCarrier
      ? `Labels are bought from the local fake carrier (TEST LABEL PDFs); a postcode 00000 or "REFUSE" in an address is refused.`
      : "Labels are bought through EasyPost with CARRIER_API_KEY.",
    fakesS3 ? `Photos are kept in the local fake S3 on 127.0.0.1:${env.FAKE_S3_PORT}.` : `Photos are kept in the bucket ${env.S3_BUCKET}.`,
    "",
    "Press Ctrl-C to stop.",
  ];
  console.log(`\n${lines.join("\n")}\n`);
}

function run(): void {
  const childEnv = {
    ...process.env,
    NODE_ENV: development ? "development" : "production",
    PORT: String(env.PORT),
    HOST: env.HOST,
    APP_URL: env.APP_URL,
    // Nothing stands in front of the demo: clients connect to it directly.
    TRUST_PROXY: env.TRUST_PROXY ? "1" : "0",
    DATABASE_URL: env.DATABASE_URL,
    SMTP_URL: env.SMTP_URL ?? `smtp://127.0.0.1:${env.MAIL_CATCHER_PORT}`,
    MAIL_CATCHER_PORT: String(env.MAIL_CATCHER_PORT),
    CARRIER_API_KEY: env.CARRIER_API_KEY ?? FAKE_CARRIER_API_KEY,
    CARRIER_API_URL: fakesCarrier ? `http://127.0.0.1:${env.FAKE_CARRIER_PORT}/v2/` : env.CARRIER_API_URL,
    FAKE_CARRIER_PORT: String(env.FAKE_CARRIER_PORT),
    ...(fakesS3
      ? {
          S3_BUCKET: FAKE_S3_BUCKET,
          S3_ENDPOINT: `http://127.0.0.1:${env.FAKE_S3_PORT}`,
          S3_ACCESS_KEY_ID: FAKE_S3_CREDENTIALS.accessKeyId,
          S3_SECRET_ACCESS_KEY: FAKE_S3_CREDENTIALS.secretAccessKey,
        }
      : {}),
    // Vite's dev server reads the route table as it runs; the build has read it already.
    BENCHPOST_DEMO_BUILD: "1",
  };
  const services: ChildProcess[] = development
    ? [
        startService("web", bin.tsx, ["scripts/web.ts", "--dev"], childEnv),
        startService("worker", bin.tsx, ["scripts/worker.ts"], childEnv),
      ]
    : [startService("web", "build/web.js", [], childEnv), startService("worker", "build/worker.js", [], childEnv)];
  if (catchesMail) services.push(startService("mail-catcher", bin.tsx, ["scripts/mail-catcher.ts"], childEnv));
  if (fakesCarrier) services.push(startService("fake-carrier", bin.tsx, ["scripts/fake-carrier.ts"], childEnv));
  if (fakesS3) services.push(startService("fake-s3", bin.tsx, ["scripts/fake-s3.ts"], childEnv));
  // Ctrl-C reaches every process of the terminal's group at once, so the children also stop on their
  // own (tsx answers SIGINT with code 130): once we are stopping, their exit codes are no news.
  let stopping = false;
  const stop = () => {
    stopping = true;
    for (const service of services) service.kill("SIGTERM");
  };
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
  for (const service of services) {
    service.once("exit", (code) => {
      if (stopping) return;
      if (code) console.error(`A Benchpost process stopped with code ${code}; stopping the others.`);
      stop();
      process.exitCode = code ?? 0;
    });
  }
  printWelcome();
}

prepare()
  .then(run)
  .catch((error: unknown) => {
    console.error(error instanceof SetupError ? error.message : error);
    process.exit(1);
  });
