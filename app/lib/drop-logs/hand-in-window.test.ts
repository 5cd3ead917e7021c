import { describe, expect, it } from "vitest";
import { handInStanding } from "./hand-in-window";

describe("a hand-in's standing for staff", () => {
  const due = new Date("2027-11-01T09:00:00Z");

  it("is not due yet with nothing handed in up to and including the student's own due instant, missing a millisecond after", () => {
    expect(handInStanding(null, due, new Date("2027-11-01T09:00:00.000Z"))).toBe("not-due");
    expect(handInStanding(null, due, new Date("2027-11-01T09:00:00.001Z"))).toBe("missing");
  });

  it("follows the counted version's late flag once something is handed in, whatever the time", () => {
    expect(handInStanding(false, due, new Date("2027-12-01T00:00:00Z"))).toBe("on-time");
    expect(handInStanding(true, due, new Date("2027-10-01T00:00:00Z"))).toBe("late");
  });
});
