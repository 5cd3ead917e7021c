import { describe, expect, it } from "vitest";
import { PASSWORD_MAX_LENGTH, passwordProblem } from "./password-policy";

describe("passwordProblem (NIST SP 800-63B length and blocklist rules)", () => {
  it("asks for at least 8 characters, counted as characters rather than bytes", () => {
    expect(passwordProblem("seven c")).toBe("too-short");
    // Four emoji are 16 bytes in UTF-8 but only four characters.
    expect(passwordProblem("🌊🌊🌊🌊")).toBe("too-short");
    expect(passwordProblem("ünïcødé!")).toBeNull();
  });

  it("accepts 64 characters and more, up to the cap", () => {
    expect(passwordProblem("x".repeat(64))).toBeNull();
    expect(passwordProblem("y".repeat(PASSWORD_MAX_LENGTH))).toBeNull();
    expect(passwordProblem("z".repeat(PASSWORD_MAX_LENGTH + 1))).toBe("too-long");
  });

  it("refuses the most common passwords whatever their case", () => {
    expect(passwordProblem("password123")).toBe("too-common");
    expect(passwordProblem("QwErTyUiOp")).toBe("too-common");
    expect(passwordProblem("glycerol at twenty degrees")).toBeNull();
  });
});
