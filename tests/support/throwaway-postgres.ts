/**
 * A PostgreSQL server of one test's own, in a temporary folder on a free port. A test that stops and
 * starts its database server uses this, so that the suites running beside it on the project's cluster
 * (and other people's test runs) never notice.
 */
import { spawnSync } from "node:child_process";
import { chownSync, existsSync, mkdtempSync, readdirSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import pg from "pg";

const isRoot = process.getuid?.() === 0;

function postgresBin(): string {
  const base = "/usr/lib/postgresql";
  const versions = existsSync(base) ? readdirSync(base).filter((version) => existsSync(join(base, version, "bin", "initdb"))) : [];
  if (!versions.length) throw new Error("PostgreSQL is not installed (npm run db:start installs it).");
  return join(base, versions.sort((a, b) => Number(b) - Number(a))[0], "bin");
}

function run(command: string, args: string[]): void {
  const [file, argv] = isRoot ? ["runuser", ["-u", "postgres", "--", command, ...args]] : [command, args];
  const result = spawnSync(file, argv, { cwd: "/", encoding: "utf8" });
  if (result.status !== 0) throw new Error(`${command} ${args.join(" ")} failed: ${result.stderr || result.stdout}`);
}

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const probe = createServer().listen(0, "127.0.0.1", () => {
      const { port } = probe.address() as { port: number };
      probe.close(() => resolve(port));
    });
  });
}

export type ThrowawayPostgres = { url: string; stop(): void; start(): void; destroy(): void };

export async function startThrowawayPostgres(): Promise<ThrowawayPostgres> {
  const bin = postgresBin();
  const folder = mkdtempSync(join(tmpdir(), "benchpost-pg-"));
  if (isRoot) {
    const uid = Number(spawnSync("id", ["-u", "postgres"], { encoding: "utf8" }).stdout.trim());
    chownSync(folder, uid, uid === 0 ? 0 : Number(spawnSync("id", ["-g", "postgres"], { encoding: "utf8" }).stdout.trim()));
  }
  const port = await freePort();
  run(join(bin, "initdb"), ["-D", folder, "-U", "benchpost", "--auth=trust", "-E", "UTF8", "--no-locale"]);
  const start = () =>
    run(join(bin, "pg_ctl"), [
      "-D",
      folder,
      "-l",
      join(folder, "server.log"),
      "-o",
      `-p ${port} -c listen_addresses=127.0.0.1 -k ''`,
      "-w",
      "-t",
      "30",
      "start",
    ]);
  const stop = () => run(join(bin, "pg_ctl"), ["-D", folder, "-m", "fast", "-w", "stop"]);
  start();
  const client = new pg.Client({ connectionString: `postgresql://benchpost@127.0.0.1:${port}/postgres` });
  await client.connect();
  await client.query("create database benchpost_restart");
  await client.end();
  return {
    url: `postgresql://benchpost@127.0.0.1:${port}/benchpost_restart`,
    stop,
    start,
    destroy() {
      stop();
      rmSync(folder, { recursive: true, force: true });
    },
  };
}
