import { describe, expect, it } from "vitest";
import { safeRedirectPath } from "./http.server";

describe("safeRedirectPath", () => {
  it.each(["/", "/account", "/courses/abc/labs?tab=open#mark", "/sign-in?redirectTo=%2Faccount", "/a/b%5Cc"])(
    "keeps the path %j on this site",
    (path) => {
      expect(safeRedirectPath(path)).toBe(path);
    },
  );

  // Each would take a browser to another site (tabs and line breaks are dropped, a backslash reads as a slash).
  it.each([
    "/\t/evil.example",
    "/\n/evil.example",
    "/\r\n/evil.example",
    "\t//evil.example",
    "/\\evil.example",
    "/\\/evil.example",
    "/x\\..\\\\evil.example",
    "//evil.example",
    "https://evil.example",
    "javascript:alert(1)",
    "evil.example",
    "/\u0000/evil.example",
    "/\u007f/evil.example",
    "",
  ])("refuses %j", (target) => {
    expect(safeRedirectPath(target)).toBe("/");
  });

  it("falls back to the given path for a missing or non-text value", () => {
    expect(safeRedirectPath(null, "/account")).toBe("/account");
    expect(safeRedirectPath(undefined)).toBe("/");
    expect(safeRedirectPath(new File([], "x"))).toBe("/");
  });
});
