/**
 * `npm start`: everything a newcomer needs to see Benchpost with its demo data. Ensures the database,
 * migrates, seeds when empty, builds, and runs the web server (and the other processes) until Ctrl-C.
 * `npm run dev` is the same with the Vite dev server (hot reload) in place of the build.
 */
import type { ChildProcess } from "node:child_process";
import { DEMO_PASSWORD, buildDemoScenario } from "../seeds/demo-scenario";
import { prepareDevelopmentDatabase } from "../seeds/seed-demo";
import { developmentDatabaseUrl } from "./lib/database-url";
import { SetupError } from "./lib/postgres";
import { bin, portIsFree, runStep, startService } from "./lib/processes";

const port = Number(process.env.PORT ?? 3000);
const development = process.argv.includes("--dev");
const mailCatcherPort = Number(process.env.MAIL_CATCHER_PORT ?? 1025);
// Without a Resend key, mail goes to the local catcher and can be read at /dev/inbox.
const catchesMail = !process.env.RESEND_API_KEY;

async function prepare(): Promise<void> {
  if (!(await portIsFree(port))) throw new SetupError(`Port ${port} is already in use: stop what is running there, or set PORT.`);
  if (catchesMail && !(await portIsFree(mailCatcherPort, "127.0.0.1"))) {
    throw new SetupError(`Port ${mailCatcherPort} (the mail catcher) is already in use: stop what is running there, or set MAIL_CATCHER_PORT.`);
  }
  console.log(`Demo scenario: ${await prepareDevelopmentDatabase()}.`);
  if (!development) runStep("Building the app", bin.reactRouter, ["build"]);
}

function printWelcome(): void {
  const scenario = buildDemoScenario();
  const lines = [
    `Benchpost is running at http://localhost:${port}`,
    "",
    `Demo sign-ins (password for all: ${DEMO_PASSWORD}):`,
    `  instructor  ${scenario.instructor.email}`,
    ...scenario.tas.map((ta) => `  TA          ${ta.email}`),
    `  student     ${scenario.students[0].email} (and ${scenario.students.length - 1} more)`,
    "",
    catchesMail ? `E-mail is caught locally: read it at http://localhost:${port}/dev/inbox` : "E-mail goes out through Resend.",
    "",
    "Press Ctrl-C to stop.",
  ];
  console.log(`\n${lines.join("\n")}\n`);
}

function run(): void {
  const env = {
    ...process.env,
    NODE_ENV: development ? "development" : "production",
    PORT: String(port),
    DATABASE_URL: developmentDatabaseUrl(),
    SMTP_URL: process.env.SMTP_URL ?? `smtp://127.0.0.1:${mailCatcherPort}`,
    MAIL_CATCHER_PORT: String(mailCatcherPort),
    BENCHPOST_DEV_INBOX: process.env.BENCHPOST_DEV_INBOX ?? "1",
  };
  const web = development
    ? startService("web", bin.reactRouter, ["dev", "--port", String(port), "--strictPort"], env)
    : startService("web", bin.reactRouterServe, ["build/server/index.js"], env);
  const services: ChildProcess[] = [web, startService("worker", bin.tsx, ["scripts/worker.ts"], env)];
  if (catchesMail) services.push(startService("mail-catcher", bin.tsx, ["scripts/mail-catcher.ts"], env));
  const stop = () => {
    for (const service of services) service.kill("SIGTERM");
  };
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
  for (const service of services) {
    service.once("exit", (code) => {
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
