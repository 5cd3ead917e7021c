import { RouterContextProvider } from "react-router";
import { describe, expect, it } from "vitest";
import { isLoopbackAddress, loadContextFor } from "./load-context.server";

describe("load context", () => {
  it("is the provider React Router requires with middleware on, carrying the socket's address", () => {
    const context = loadContextFor("::1");
    expect(context).toBeInstanceOf(RouterContextProvider);
    expect(context.remoteAddress).toBe("::1");
  });

  it.each(["127.0.0.1", "127.255.3.4", "::1", "::ffff:127.0.0.1", "0:0:0:0:0:0:0:1"])("counts %s as this machine", (address) => {
    expect(isLoopbackAddress(address)).toBe(true);
  });

  // Documentation and private ranges (RFC 5737, RFC 3849, RFC 1918), never the machine's own.
  it.each(["192.0.2.10", "10.0.0.1", "128.0.0.1", "::ffff:192.0.2.10", "2001:db8::1", "::2", "localhost", "", undefined])(
    "does not count %s",
    (address) => {
      expect(isLoopbackAddress(address)).toBe(false);
    },
  );
});
