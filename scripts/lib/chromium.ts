import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { SetupError } from "./postgres";

export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";

/** The browser suite drives Debian's Chromium; install it when it is missing. */
export function ensureChromium(): void {
  if (existsSync(CHROMIUM_PATH)) return;
  if (process.getuid?.() !== 0) {
    throw new SetupError(`Chromium is missing at ${CHROMIUM_PATH}: run \`sudo apt-get install -y chromium\`, or set CHROMIUM_PATH.`);
  }
  console.log("Installing Chromium from Debian's packages for the browser tests…");
  const update = spawnSync("apt-get", ["update"], { stdio: "inherit" });
  const install =
    update.status === 0
      ? spawnSync("apt-get", ["install", "-y", "--no-install-recommends", "chromium"], {
          stdio: "inherit",
          env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" },
        })
      : update;
  if (install.status !== 0 || !existsSync(CHROMIUM_PATH)) {
    throw new SetupError("Could not install Chromium with apt-get; install the `chromium` package by hand.");
  }
}
