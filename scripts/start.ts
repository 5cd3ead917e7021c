/**
 * `npm start`: everything a newcomer needs to see Benchpost with its demo data. Ensures the database,
 * migrates, seeds when empty, builds, and runs the web server (and the other processes) until Ctrl-C.
 * `npm run dev` is the same with the Vite dev server (hot reload) in place of the build.
 */
import type { ChildProcess } from "node:child_process";
import { createDatabase, createPool } from "~/server/db.server";
import { migrateDatabase } from "~/server/migrate.server";
import { DEMO_PASSWORD, buildDemoScenario } from "../seeds/demo-scenario";
import { seedDemo } from "../seeds/seed-demo";
import { developmentDatabaseUrl } from "./lib/database-url";
import { SetupError, ensureDatabases } from "./lib/postgres";
import { bin, portIsFree, runStep, startService } from "./lib/processes";

const port = Number(process.env.PORT ?? 3000);
const development = process.argv.includes("--dev");

async function prepare(): Promise<void> {
  if (!(await portIsFree(port))) throw new SetupError(`Port ${port} is already in use: stop what is running there, or set PORT.`);
  await ensureDatabases();
  await migrateDatabase(developmentDatabaseUrl());
  const pool = createPool();
  try {
    console.log(`Demo scenario: ${await seedDemo(createDatabase(pool))}.`);
  } finally {
    await pool.end();
  }
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
  };
  const web = development
    ? startService("web", bin.reactRouter, ["dev", "--port", String(port), "--strictPort"], env)
    : startService("web", bin.reactRouterServe, ["build/server/index.js"], env);
  const services: ChildProcess[] = [web];
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
