/**
 * Serving the built app on loopback for the browser suite and the benchmarks: a free port, and
 * waiting until the server answers its health check.
 */
import type { ChildProcess } from "node:child_process";
import { createServer } from "node:net";

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer().listen(0, "127.0.0.1", () => {
      const address = probe.address();
      probe.close(() => (typeof address === "object" && address ? resolve(address.port) : reject(new Error("no port"))));
    });
  });
}

/** Polls `path` (the app's health check, or any page of another server) until it answers 2xx. */
export async function waitForHealth(baseUrl: string, server: ChildProcess, path = "/healthz"): Promise<void> {
  const deadline = Date.now() + 30_000;
  while (Date.now() < deadline) {
    if (server.exitCode !== null) throw new Error(`The app server exited with code ${server.exitCode}`);
    try {
      if ((await fetch(`${baseUrl}${path}`)).ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
  throw new Error(`The app server did not answer at ${baseUrl} within 30 s`);
}
