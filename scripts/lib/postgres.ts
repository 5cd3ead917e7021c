/**
 * The project's own PostgreSQL cluster: found or installed from Debian's packages, created once,
 * started on 127.0.0.1 on a port of its own. Nothing here deletes data except `resetDatabases`.
 */
import { execFileSync, spawnSync, type SpawnSyncReturns } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdirSync, readdirSync, chmodSync, chownSync, statSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import pg from "pg";
import { localPort, LOCAL_USER, databaseName, developmentDatabaseUrl, maintenanceUrl, testDatabaseUrl } from "./database-url";

/** A failure the user can fix: printed as one line, never as a stack trace. */
export class SetupError extends Error {}

const projectRoot = resolve(import.meta.dirname, "../..");
const isRoot = process.getuid?.() === 0;

function run(command: string, args: string[], options: { asPostgres?: boolean } = {}): SpawnSyncReturns<string> {
  const [file, argv] = options.asPostgres && isRoot ? ["runuser", ["-u", "postgres", "--", command, ...args]] : [command, args];
  // initdb and pg_ctl resolve paths against the working folder, which postgres may not be able to enter.
  return spawnSync(file, argv, { cwd: "/", encoding: "utf8" });
}

function findPostgresBin(): string | undefined {
  const base = "/usr/lib/postgresql";
  if (!existsSync(base)) return undefined;
  const versions = readdirSync(base)
    .filter((version) => existsSync(join(base, version, "bin", "initdb")))
    .sort((a, b) => Number(b) - Number(a));
  return versions.length ? join(base, versions[0], "bin") : undefined;
}

function installPostgres(): string {
  if (!isRoot) {
    throw new SetupError("PostgreSQL is not installed: run `sudo apt-get install -y postgresql`, or set DATABASE_URL.");
  }
  console.log("Installing PostgreSQL from Debian's packages (initdb was not found)…");
  const update = run("apt-get", ["update"]);
  const install = update.status === 0 ? run("apt-get", ["install", "-y", "--no-install-recommends", "postgresql"]) : update;
  const bin = findPostgresBin();
  if (install.status !== 0 || !bin) {
    throw new SetupError(
      `Could not install PostgreSQL with apt-get (${install.stderr.trim().split("\n").pop()}); install it, or set DATABASE_URL.`,
    );
  }
  return bin;
}

/** True when the postgres system user can enter the folder (every parent must be traversable). */
function traversableByPostgres(folder: string): boolean {
  if (!isRoot) return true;
  return run("test", ["-x", folder], { asPostgres: true }).status === 0;
}

/**
 * The cluster lives in the checkout's `.data/` when the postgres user can reach it; otherwise (a CI
 * clone under a private home, say) in a folder of its own under /var/lib, one per checkout path.
 */
export function clusterFolder(): string {
  const local = join(projectRoot, ".data");
  mkdirSync(local, { recursive: true });
  if (traversableByPostgres(local)) return join(local, "postgres");
  const key = createHash("sha256").update(projectRoot).digest("hex").slice(0, 12);
  return join("/var/lib/benchpost", key, "postgres");
}

function socketOption(folder: string): string {
  // A Unix socket path must stay under 107 bytes; past that we listen on TCP only.
  return folder.length + "/.s.PGSQL.00000".length < 100 ? folder : "";
}

function pgCtl(bin: string, folder: string, action: string, extra: string[] = []): SpawnSyncReturns<string> {
  return run(join(bin, "pg_ctl"), ["-D", folder, ...extra, action], { asPostgres: true });
}

function createCluster(bin: string, folder: string): void {
  mkdirSync(dirname(folder), { recursive: true, mode: 0o755 });
  mkdirSync(folder, { recursive: true, mode: 0o700 });
  chmodSync(folder, 0o700);
  if (isRoot) {
    const uid = Number(execFileSync("id", ["-u", "postgres"], { encoding: "utf8" }).trim());
    const gid = Number(execFileSync("id", ["-g", "postgres"], { encoding: "utf8" }).trim());
    chownSync(folder, uid, gid);
  }
  // Trust on loopback only: this is a developer's throw-away cluster, never a production one.
  const result = run(join(bin, "initdb"), ["-D", folder, "-U", LOCAL_USER, "--auth=trust", "-E", "UTF8", "--no-locale"], {
    asPostgres: true,
  });
  if (result.status !== 0) throw new SetupError(`initdb failed in ${folder}: ${lastLine(result.stderr)}`);
}

function lastLine(text: string): string {
  return text.trim().split("\n").filter(Boolean).pop() ?? "no output";
}

function isRunning(bin: string, folder: string): boolean {
  return existsSync(join(folder, "PG_VERSION")) && pgCtl(bin, folder, "status").status === 0;
}

async function canConnect(url: string): Promise<boolean> {
  const client = new pg.Client({ connectionString: url, connectionTimeoutMillis: 3000 });
  try {
    await client.connect();
    return true;
  } catch {
    return false;
  } finally {
    await client.end().catch(() => {});
  }
}

async function startLocalCluster(): Promise<void> {
  const bin = findPostgresBin() ?? installPostgres();
  const folder = clusterFolder();
  if (!existsSync(join(folder, "PG_VERSION"))) createCluster(bin, folder);
  if (isRunning(bin, folder)) return;
  const options = `-p ${localPort()} -c listen_addresses=127.0.0.1 -k '${socketOption(folder)}'`;
  const result = pgCtl(bin, folder, "start", ["-l", join(folder, "server.log"), "-o", options, "-w", "-t", "30"]);
  if (result.status !== 0) {
    const portTaken = await canConnect(maintenanceUrl(developmentDatabaseUrl()));
    throw new SetupError(
      portTaken
        ? `Port ${localPort()} is already used by another PostgreSQL: stop it or set BENCHPOST_PG_PORT.`
        : `PostgreSQL did not start (see ${join(folder, "server.log")}): ${lastLine(result.stdout + result.stderr)}`,
    );
  }
}

async function createDatabaseIfMissing(url: string): Promise<boolean> {
  const client = new pg.Client({ connectionString: maintenanceUrl(url) });
  await client.connect();
  try {
    const name = databaseName(url);
    const { rowCount } = await client.query("select 1 from pg_database where datname = $1", [name]);
    if (rowCount) return false;
    await client.query(`create database "${name.replaceAll('"', '""')}"`);
    return true;
  } finally {
    await client.end();
  }
}

/** Brings up the server (unless DATABASE_URL points elsewhere) and makes sure both databases exist. */
export async function ensureDatabases(): Promise<{ created: string[] }> {
  if (!process.env.DATABASE_URL) await startLocalCluster();
  else if (!(await canConnect(maintenanceUrl(developmentDatabaseUrl())))) {
    throw new SetupError(`Cannot reach the PostgreSQL server named by DATABASE_URL (${new URL(developmentDatabaseUrl()).host}).`);
  }
  const created: string[] = [];
  for (const url of [developmentDatabaseUrl(), testDatabaseUrl()]) {
    if (await createDatabaseIfMissing(url)) created.push(databaseName(url));
  }
  return { created };
}

export function stopLocalCluster(): "stopped" | "not running" {
  const bin = findPostgresBin();
  const folder = clusterFolder();
  if (!bin || !isRunning(bin, folder)) return "not running";
  const result = pgCtl(bin, folder, "stop", ["-m", "fast", "-w"]);
  if (result.status !== 0) throw new SetupError(`pg_ctl stop failed: ${lastLine(result.stderr)}`);
  return "stopped";
}

export async function describeStatus(): Promise<string> {
  if (process.env.DATABASE_URL) {
    const up = await canConnect(developmentDatabaseUrl());
    return `DATABASE_URL (${new URL(developmentDatabaseUrl()).host}): ${up ? "reachable" : "unreachable"}`;
  }
  const bin = findPostgresBin();
  const folder = clusterFolder();
  if (!bin) return "PostgreSQL is not installed (npm run db:start installs it)";
  if (!existsSync(join(folder, "PG_VERSION"))) return `no cluster yet in ${folder} (npm run db:start creates it)`;
  const since = statSync(join(folder, "PG_VERSION")).mtime.toISOString().slice(0, 10);
  return `${isRunning(bin, folder) ? "running" : "stopped"} on 127.0.0.1:${localPort()}, data in ${folder} (created ${since})`;
}

/** Drops and recreates the development and test databases. The only function here that deletes data. */
export async function resetDatabases(): Promise<void> {
  await ensureDatabases();
  for (const url of [developmentDatabaseUrl(), testDatabaseUrl()]) {
    const client = new pg.Client({ connectionString: maintenanceUrl(url) });
    await client.connect();
    const name = `"${databaseName(url).replaceAll('"', '""')}"`;
    try {
      await client.query(`drop database if exists ${name} with (force)`);
      await client.query(`create database ${name}`);
    } finally {
      await client.end();
    }
  }
}
