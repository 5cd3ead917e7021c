import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { SetupError } from "./postgres";

/**
 * Installs one of Debian's packages when the file it provides is missing, as root only (a developer
 * without root is told the command instead). The test suites use this for what they drive but do not
 * ship: Chromium, PgBouncer.
 */
export function ensureDebianPackage({
  name,
  title,
  path,
  purpose,
  pathVariable,
}: {
  /** The package's name, e.g. `pgbouncer`. */
  name: string;
  /** The program's own name, for messages: `PgBouncer`. */
  title: string;
  path: string;
  purpose: string;
  pathVariable: string;
}): void {
  if (existsSync(path)) return;
  if (process.getuid?.() !== 0) {
    throw new SetupError(`${title} is missing at ${path}: run \`sudo apt-get install -y ${name}\`, or set ${pathVariable}.`);
  }
  console.log(`Installing ${title} from Debian's packages for ${purpose}…`);
  const update = spawnSync("apt-get", ["update"], { stdio: "inherit" });
  const install =
    update.status === 0
      ? spawnSync("apt-get", ["install", "-y", "--no-install-recommends", name], {
          stdio: "inherit",
          env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" },
        })
      : update;
  if (install.status !== 0 || !existsSync(path)) {
    throw new SetupError(`Could not install ${title} with apt-get; install the \`${name}\` package by hand.`);
  }
}
