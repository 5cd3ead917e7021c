/**
 * `npm run db:start | db:stop | db:status | db:reset [--yes]`: the project's PostgreSQL.
 * Every failure is one line that says what is missing and how to fix it.
 */
import { createInterface } from "node:readline/promises";
import { SetupError, describeStatus, ensureDatabases, resetDatabases, stopLocalCluster } from "./lib/postgres";

async function confirmReset(): Promise<boolean> {
  if (process.argv.includes("--yes")) return true;
  if (!process.stdin.isTTY) {
    console.error("db:reset deletes the development and test databases; run it again with --yes to confirm.");
    return false;
  }
  const prompt = createInterface({ input: process.stdin, output: process.stdout });
  const answer = await prompt.question("This deletes all data in the development and test databases. Type 'reset' to go on: ");
  prompt.close();
  return answer.trim() === "reset";
}

async function main(command: string | undefined): Promise<void> {
  switch (command) {
    case "start": {
      const { created } = await ensureDatabases();
      console.log(created.length ? `PostgreSQL ready; created ${created.join(", ")}.` : "PostgreSQL ready; nothing to change.");
      return;
    }
    case "stop":
      console.log(`PostgreSQL ${stopLocalCluster()}.`);
      return;
    case "status":
      console.log(await describeStatus());
      return;
    case "reset":
      if (!(await confirmReset())) {
        process.exitCode = 1;
        return;
      }
      await resetDatabases();
      console.log("Development and test databases are empty again; `npm start` migrates and seeds.");
      return;
    default:
      throw new SetupError("Usage: tsx scripts/db.ts start|stop|status|reset [--yes]");
  }
}

main(process.argv[2]).catch((error: unknown) => {
  console.error(error instanceof SetupError ? error.message : error);
  process.exit(1);
});
