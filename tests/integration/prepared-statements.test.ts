/**
 * DATABASE_PREPARED_STATEMENTS: the hot path (a student's hand-in through the built app: the session,
 * the course access, the lab, the hand-in's own statements) works with named statements and without
 * them, as it must behind a transaction pooler that cannot keep them; and the switch really decides
 * whether any statement is sent with a name.
 */
import { randomUUID } from "node:crypto";
import pg from "pg";
import { afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import { appOrigin, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";

let handle: AppHandler;
let fixture: AccessFixture;
let cookie: string;

beforeAll(async () => {
  handle = await createAppHandler();
  fixture = await createAccessFixture("prepared");
  cookie = await sessionCookieFor(fixture.userIds.ownStudent);
});

afterEach(() => {
  delete process.env.DATABASE_PREPARED_STATEMENTS;
});

/** A hand-in through the app, with the names of the statements it sent (undefined for an unnamed one). */
async function handIn(key: string) {
  const spy = vi.spyOn(pg.Client.prototype, "query");
  try {
    const response = await handle(
      new Request(new URL(`/api/v1/labs/${fixture.labId}/drop-logs`, appOrigin()), {
        method: "POST",
        headers: { Cookie: cookie, Origin: appOrigin(), "Content-Type": "application/json", "Idempotency-Key": key },
        body: JSON.stringify({ sphereId: fixture.sphereId, temperatureC: 22, drops: [7.4, 7.5, 7.45, 7.52, 7.39] }),
      }),
    );
    const names = spy.mock.calls.map(([config]) =>
      typeof config === "object" && config !== null ? (config as { name?: string }).name : undefined,
    );
    return {
      status: response.status,
      body: (await response.json()) as { version: { id: string; version: number }; duplicate: boolean },
      names,
    };
  } finally {
    spy.mockRestore();
  }
}

describe.each(["on", "off"] as const)("with DATABASE_PREPARED_STATEMENTS=%s", (setting) => {
  it("hands in, answers a repeat with the stored version, and names statements only when on", async () => {
    process.env.DATABASE_PREPARED_STATEMENTS = setting;
    const key = `prepared-${setting}-${randomUUID()}`;
    const first = await handIn(key);
    expect(first.status).toBe(201);
    expect(first.body.duplicate).toBe(false);
    // Twice, so that a named statement is also run where its connection has it prepared already.
    for (let attempt = 0; attempt < 2; attempt++) {
      const repeat = await handIn(key);
      expect(repeat.status).toBe(200);
      expect(repeat.body).toEqual({ ...first.body, duplicate: true });
    }
    const named = first.names.filter((name) => name !== undefined);
    if (setting === "on") expect(named).toEqual(expect.arrayContaining(["session_lookup", "course_access", "hand_in_lock_drop_log"]));
    else expect(named).toEqual([]);
  });
});
