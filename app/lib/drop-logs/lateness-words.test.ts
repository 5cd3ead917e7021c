import { describe, expect, it } from "vitest";
import { lateBy } from "./lateness-words";

const due = "2026-11-18T12:00:00Z";
const after = (ms: number) => new Date(new Date(due).getTime() + ms);
const minute = 60_000;
const hour = 60 * minute;
const day = 24 * hour;

describe("lateBy", () => {
  it("agrees with 0, 1 and 2 of each unit", () => {
    expect(lateBy(after(0), due)).toBe("under a minute");
    expect(lateBy(after(minute), due)).toBe("1 minute");
    expect(lateBy(after(2 * minute), due)).toBe("2 minutes");
    expect(lateBy(after(hour), due)).toBe("1 hour");
    expect(lateBy(after(2 * hour + minute), due)).toBe("2 hours 1 minute");
    expect(lateBy(after(day + 2 * minute), due)).toBe("1 day");
    expect(lateBy(after(2 * day + hour + 5 * minute), due)).toBe("2 days 1 hour");
  });
  it("never reads a hand-in before the due time as late by a negative amount", () => {
    expect(lateBy(after(-hour), due)).toBe("under a minute");
  });
});
