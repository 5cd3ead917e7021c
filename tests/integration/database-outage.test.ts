/**
 * The app with its database unreachable: a handler whose pool points at a loopback port nobody
 * listens on, so every connection is refused. The API answers 503 in its error shape with
 * Retry-After, pages the 503 page, and /healthz says the database is down without its error text.
 */
import { createServer } from "node:net";
import { beforeAll, describe, expect, it } from "vitest";
import type { AppHandler } from "../support/app-requests";

let handle: AppHandler;
let appRequest: typeof import("../support/app-requests").appRequest;

/** A port that was free a moment ago and is closed again: connecting to it is refused at once. */
async function closedPort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const { port } = server.address() as { port: number };
  await new Promise((resolve) => server.close(resolve));
  return port;
}

beforeAll(async () => {
  // Before any app module makes the one pool of the process: it reads DATABASE_URL then.
  process.env.DATABASE_URL = `postgresql://benchpost@127.0.0.1:${await closedPort()}/benchpost_unreachable`;
  const requests = await import("../support/app-requests");
  appRequest = requests.appRequest;
  handle = await requests.createAppHandler();
});

// Any session token will do: checking it needs the database.
const cookie = "benchpost_session=some-session-token";

describe("with the database unreachable", () => {
  it.each([
    ["a signed-in call", () => appRequest("/api/v1/me", { cookie })],
    ["a personal token", () => appRequest("/api/v1/me", { headers: { Authorization: "Bearer bpt_some-token" } })],
    [
      "a hand-in",
      () =>
        appRequest("/api/v1/labs/00000000-0000-4000-8000-000000000000/drop-logs", {
          method: "POST",
          headers: { Authorization: "Bearer bpt_some-token", "Content-Type": "application/json" },
        }),
    ],
  ])("the API answers %s with 503 in its error shape, saying nothing was stored", async (_, request) => {
    const response = await handle(request());
    expect(response.status).toBe(503);
    expect(response.headers.get("content-type")).toMatch(/^application\/json/);
    expect(Number(response.headers.get("retry-after"))).toBeGreaterThan(0);
    const body = await response.json();
    expect(body).toEqual({ error: { code: "database_unavailable", message: expect.stringContaining("nothing was stored") } });
  });

  it.each([
    ["a signed-in page", () => appRequest("/", { cookie })],
    [
      "a sign-in attempt",
      () => appRequest("/sign-in", { form: { intent: "password", email: "someone@example.org", password: "a password" } }),
    ],
  ])("answers %s with the 503 page", async (_, request) => {
    const response = await handle(request());
    expect(response.status).toBe(503);
    expect(response.headers.get("content-type")).toMatch(/^text\/html/);
    expect(Number(response.headers.get("retry-after"))).toBeGreaterThan(0);
    const page = await response.text();
    expect(page).toContain("Benchpost cannot reach its database just now");
    expect(page).not.toMatch(/ECONNREFUSED|127\.0\.0\.1/);
  });

  it("reports the database down on /healthz without the error's text", async () => {
    const response = await handle(appRequest("/healthz"));
    expect(response.status).toBe(503);
    const text = await response.text();
    expect(JSON.parse(text)).toEqual({ status: "degraded", database: { status: "down" } });
    expect(text).not.toMatch(/ECONNREFUSED|connect|127\.0\.0\.1/);
  });
});
