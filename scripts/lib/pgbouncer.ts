/**
 * PgBouncer in front of the project's PostgreSQL, in transaction mode, as a deployment behind a
 * transaction pooler runs (README, "Deploying it"). Debian's package, installed when it is missing, as
 * Chromium is; the package's own service (port 6432, /etc/pgbouncer) is left alone: each caller runs
 * an instance of its own on a free loopback port with a configuration in a temporary folder.
 */
import { spawn } from "node:child_process";
import { chmod, mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import pg from "pg";
import { ensureDebianPackage } from "./debian-package";

export const PGBOUNCER_PATH = process.env.PGBOUNCER_PATH ?? "/usr/sbin/pgbouncer";

export function ensurePgBouncer(): void {
  ensureDebianPackage({
    name: "pgbouncer",
    title: "PgBouncer",
    path: PGBOUNCER_PATH,
    purpose: "the scale test",
    pathVariable: "PGBOUNCER_PATH",
  });
}

export type PgBouncer = {
  /** `databaseUrl` (a database on the server behind it) as reached through the pooler. */
  urlFor(databaseUrl: string): string;
  /** One statement on PgBouncer's admin console (SHOW POOLS, SHOW STATS, …), as rows. */
  show(command: string): Promise<Record<string, unknown>[]>;
  /** What PgBouncer wrote to its log, for a failure's report. */
  output(): string;
  stop(): Promise<void>;
};

/**
 * Starts PgBouncer on `port` (loopback) in front of the server `serverUrl` names, pooling every
 * database of it under the user that connects, in transaction mode: a server connection belongs to
 * a client only for one transaction, so nothing may rely on a session (named prepared statements,
 * session advisory locks, SET without LOCAL, LISTEN). `serverConnections` server connections per
 * database and user serve every client. Only trusted loopback clients: the server behind it trusts
 * them too (scripts/lib/postgres.ts).
 */
export async function startPgBouncer({
  serverUrl,
  port,
  serverConnections,
}: {
  serverUrl: string;
  port: number;
  serverConnections: number;
}): Promise<PgBouncer> {
  const server = new URL(serverUrl);
  const user = decodeURIComponent(server.username);
  const folder = await mkdtemp(path.join(tmpdir(), "benchpost-pgbouncer-"));
  // Run as root, PgBouncer refuses to start; told `-u postgres`, it drops to that user, which must
  // read the files. They hold no secret: clients are trusted on loopback.
  await chmod(folder, 0o755);
  const configuration = path.join(folder, "pgbouncer.ini");
  await writeFile(path.join(folder, "users.txt"), `"${user}" ""\n`, { mode: 0o644 });
  await writeFile(
    configuration,
    [
      "[databases]",
      `* = host=${server.hostname} port=${server.port || 5432}`,
      "[pgbouncer]",
      "listen_addr = 127.0.0.1",
      `listen_port = ${port}`,
      // TCP only: no socket file to clean up.
      "unix_socket_dir =",
      "auth_type = trust",
      `auth_file = ${path.join(folder, "users.txt")}`,
      `admin_users = ${user}`,
      "pool_mode = transaction",
      `default_pool_size = ${serverConnections}`,
      "max_client_conn = 500",
      // A client left waiting this long for a server connection is told so, rather than hanging a run.
      "query_wait_timeout = 60",
      // Deliberately no ignore_startup_parameters: a client that sends `options` (or any other
      // parameter PgBouncer does not know) is refused, as a deployment's pooler would refuse it.
    ].join("\n"),
    { mode: 0o644 },
  );
  const asRoot = process.getuid?.() === 0;
  const child = spawn(PGBOUNCER_PATH, [...(asRoot ? ["-u", "postgres"] : []), configuration], { stdio: ["ignore", "pipe", "pipe"] });
  let log = "";
  for (const stream of [child.stdout, child.stderr]) stream.on("data", (chunk: Buffer) => (log += chunk.toString()));
  const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));
  // Should the caller die without stopping it, PgBouncer goes with it.
  const killOnExit = () => child.kill("SIGKILL");
  process.once("exit", killOnExit);

  const urlFor = (databaseUrl: string) => {
    const pooled = new URL(databaseUrl);
    pooled.hostname = "127.0.0.1";
    pooled.port = String(port);
    return pooled.toString();
  };
  const show = async (command: string) => {
    // The admin console speaks the simple query protocol only: a query without parameters.
    const client = new pg.Client({ connectionString: urlFor(`postgresql://${encodeURIComponent(user)}@127.0.0.1/pgbouncer`) });
    await client.connect();
    try {
      return (await client.query(command)).rows as Record<string, unknown>[];
    } finally {
      await client.end();
    }
  };
  const stop = async () => {
    process.off("exit", killOnExit);
    if (child.exitCode === null && child.signalCode === null) {
      child.kill("SIGTERM");
      await exited;
    }
    await rm(folder, { recursive: true, force: true });
  };

  const deadline = Date.now() + 15_000;
  for (;;) {
    if (child.exitCode !== null) {
      await stop();
      throw new Error(`PgBouncer exited with code ${child.exitCode}:\n${log}`);
    }
    try {
      await show("SHOW VERSION");
      break;
    } catch (error) {
      if (Date.now() > deadline) {
        await stop();
        throw new Error(`PgBouncer did not answer on 127.0.0.1:${port} within 15 s (${String(error)}):\n${log}`);
      }
      await new Promise((resolve) => setTimeout(resolve, 100));
    }
  }
  return { urlFor, show, output: () => log, stop };
}
