import { describe, expect, it } from "vitest";
import { calendarDayIn, formatCalendarDay } from "./format-date";

describe("calendar days", () => {
  it("names a day as itself in every zone", () => {
    expect(formatCalendarDay("2027-05-28")).toBe("Friday, 28 May 2027");
  });

  it("tells the day an instant falls on in a zone, which can differ from UTC's", () => {
    // 23:30 UTC on 28 May is 00:30 on 29 May in Dublin (summer time, UTC+1) and 19:30 on 28 May in New York.
    const instant = new Date("2027-05-28T23:30:00Z");
    expect(calendarDayIn(instant, "Europe/Dublin")).toBe("2027-05-29");
    expect(calendarDayIn(instant, "America/New_York")).toBe("2027-05-28");
  });
});
