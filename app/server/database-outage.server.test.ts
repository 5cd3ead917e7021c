import { describe, expect, it } from "vitest";
import { isDatabaseUnavailable } from "./database-outage.server";

const withCode = (message: string, code: string) => Object.assign(new Error(message), { code });

describe("isDatabaseUnavailable", () => {
  it("recognises an unreachable database however it is wrapped", () => {
    // Drizzle wraps the driver's error as its cause; Node reports a host with two addresses as an AggregateError.
    expect(
      isDatabaseUnavailable(new Error("Failed query: select 1", { cause: withCode("the database system is starting up", "57P03") })),
    ).toBe(true);
    expect(isDatabaseUnavailable(new AggregateError([withCode("connect ECONNREFUSED ::1:5432", "ECONNREFUSED")], "connect failed"))).toBe(
      true,
    );
    expect(isDatabaseUnavailable(new Error("Connection terminated unexpectedly"))).toBe(true);
  });

  it("leaves other database errors to be 500s", () => {
    expect(
      isDatabaseUnavailable(
        new Error("Failed query: insert …", { cause: withCode("duplicate key value violates unique constraint", "23505") }),
      ),
    ).toBe(false);
    expect(isDatabaseUnavailable(withCode('invalid byte sequence for encoding "UTF8": 0x00', "22021"))).toBe(false);
    expect(isDatabaseUnavailable("ECONNREFUSED")).toBe(false);
  });
});
