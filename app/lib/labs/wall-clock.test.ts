import { describe, expect, it } from "vitest";
import { instantToWallClock, wallClockToInstant } from "./wall-clock";

// EU rule (Directive 2000/84/EC): clocks change at 01:00 UTC on the last Sundays of March and October.
// In Lisbon (UTC+0 in winter) 2027-03-28 01:00 becomes 02:00, and 2027-10-31 02:00 becomes 01:00.
describe("wall-clock times in a course's zone", () => {
  const zone = "Europe/Lisbon";

  it("names the instant on either side of the spring change", () => {
    expect(wallClockToInstant("2027-03-28T00:59", zone)).toEqual({ ok: true, instant: new Date("2027-03-28T00:59:00Z") });
    expect(wallClockToInstant("2027-03-28T02:00", zone)).toEqual({ ok: true, instant: new Date("2027-03-28T01:00:00Z") });
    expect(wallClockToInstant("2027-03-28T23:59", zone)).toEqual({ ok: true, instant: new Date("2027-03-28T22:59:00Z") });
  });

  it("refuses a time in the skipped hour, and mistyped dates", () => {
    expect(wallClockToInstant("2027-03-28T01:30", zone)).toEqual({ ok: false, reason: "skipped" });
    expect(wallClockToInstant("2027-02-30T10:00", zone)).toEqual({ ok: false, reason: "format" });
    expect(wallClockToInstant("28/03/2027 10:00", zone)).toEqual({ ok: false, reason: "format" });
  });

  it("takes the second (standard-time) occurrence of the repeated autumn hour", () => {
    expect(wallClockToInstant("2027-10-31T01:30", zone)).toEqual({ ok: true, instant: new Date("2027-10-31T01:30:00Z") });
  });

  it("shows a stored instant as the wall-clock time it was entered as", () => {
    for (const text of ["2027-03-28T00:59", "2027-03-28T02:00", "2027-07-01T12:15", "2027-12-24T23:59"]) {
      const result = wallClockToInstant(text, zone);
      expect(result.ok && instantToWallClock(result.instant, zone)).toBe(text);
    }
    expect(instantToWallClock(new Date("2027-03-28T22:59:00Z"), "America/New_York")).toBe("2027-03-28T18:59");
  });
});
