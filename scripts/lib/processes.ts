import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { createServer } from "node:net";

/** Resolves false when something already listens on the port (so we can say so in one line). */
export function portIsFree(port: number, host = "0.0.0.0"): Promise<boolean> {
  return new Promise((resolve) => {
    const probe = createServer()
      .once("error", () => resolve(false))
      .once("listening", () => probe.close(() => resolve(true)))
      .listen(port, host);
  });
}

/** Runs a project binary from node_modules with the node that runs us, failing loudly (quiet: its output only then). */
export function runStep(label: string, script: string, args: string[], env: NodeJS.ProcessEnv = process.env, { quiet = false } = {}): void {
  console.log(`\n▸ ${label}`);
  const result = spawnSync(process.execPath, [script, ...args], { stdio: quiet ? "pipe" : "inherit", env, encoding: "utf8" });
  if (result.status !== 0) {
    if (quiet) console.error(result.stdout, result.stderr);
    console.error(`✗ ${label} failed.`);
    process.exit(result.status ?? 1);
  }
}

/** Starts a long-running child with its output prefixed, and stops it when we stop. */
export function startService(name: string, script: string, args: string[], env: NodeJS.ProcessEnv): ChildProcess {
  const child = spawn(process.execPath, [script, ...args], { env, stdio: ["ignore", "pipe", "pipe"] });
  const prefix = (chunk: Buffer) =>
    chunk
      .toString()
      .split("\n")
      .filter(Boolean)
      .map((line) => `[${name}] ${line}`)
      .join("\n");
  child.stdout?.on("data", (chunk: Buffer) => console.log(prefix(chunk)));
  child.stderr?.on("data", (chunk: Buffer) => console.error(prefix(chunk)));
  return child;
}

export const bin = {
  reactRouter: "node_modules/@react-router/dev/bin.js",
  reactRouterServe: "node_modules/@react-router/serve/bin.js",
  tsc: "node_modules/typescript/bin/tsc",
  vitest: "node_modules/vitest/vitest.mjs",
  tsx: "node_modules/tsx/dist/cli.mjs",
  eslint: "node_modules/eslint/bin/eslint.js",
  prettier: "node_modules/prettier/bin/prettier.cjs",
} as const;
