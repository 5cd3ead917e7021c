import { describe, expect, it } from "vitest";
import { calendarDayIn, clocksDiffer, formatCalendarDay, formatDateTime } from "./format-date";

describe("dates and times in one style", () => {
  // 09:05:12 UTC on 3 December 2026: 09:05 in London (GMT), 10:05 in Paris (CET), 04:05 in New York (UTC−5).
  const winter = "2026-12-03T09:05:12Z";

  it("writes every style in the same order, with the zone named after each time of day", () => {
    expect(formatDateTime(winter, "Europe/London")).toBe("3 Dec 2026, 09:05 GMT");
    expect(formatDateTime(winter, "Europe/London", "seconds")).toBe("3 Dec 2026, 09:05:12 GMT");
    expect(formatDateTime(winter, "Europe/London", "long")).toBe("Thu, 3 Dec 2026, 09:05 GMT");
    expect(formatDateTime(winter, "Europe/London", "short")).toBe("Thu, 3 Dec, 09:05 GMT");
    expect(formatDateTime(winter, "Europe/London", "time")).toBe("09:05:12 GMT");
    expect(formatDateTime(winter, "Europe/London", "day")).toBe("Thu, 3 Dec 2026");
  });

  it("shows the course's zone, summer time included, and an offset where the language has no name for it", () => {
    expect(formatDateTime(winter, "Europe/Paris")).toBe("3 Dec 2026, 10:05 CET");
    expect(formatDateTime("2027-06-03T09:05:12Z", "Europe/London")).toBe("3 Jun 2027, 10:05 BST");
    expect(formatDateTime(winter, "America/New_York", "long")).toBe("Thu, 3 Dec 2026, 04:05 GMT-5");
    expect(formatDateTime(winter, "UTC")).toBe("3 Dec 2026, 09:05 UTC");
  });

  it("moves the day with the zone and keeps midnight at 00, not 24", () => {
    expect(formatDateTime("2026-12-03T00:30:00Z", "Europe/London", "long")).toBe("Thu, 3 Dec 2026, 00:30 GMT");
    expect(formatDateTime("2026-12-03T00:30:00Z", "America/New_York", "long")).toBe("Wed, 2 Dec 2026, 19:30 GMT-5");
  });
});

describe("two zones' clocks", () => {
  it("agree when they read the same time under two names, and differ with the season", () => {
    expect(clocksDiffer("2026-12-03T09:05:00Z", "Europe/London", "UTC")).toBe(false);
    expect(clocksDiffer("2027-06-03T09:05:00Z", "Europe/London", "UTC")).toBe(true);
    expect(clocksDiffer("2026-12-03T09:05:00Z", "Europe/London", "Europe/Paris")).toBe(true);
  });
});

describe("calendar days", () => {
  it("names a day as itself in every zone, with no zone", () => {
    expect(formatCalendarDay("2027-05-28")).toBe("Fri, 28 May 2027");
  });

  it("tells the day an instant falls on in a zone, which can differ from UTC's", () => {
    // 23:30 UTC on 28 May is 00:30 on 29 May in Dublin (summer time, UTC+1) and 19:30 on 28 May in New York.
    const instant = new Date("2027-05-28T23:30:00Z");
    expect(calendarDayIn(instant, "Europe/Dublin")).toBe("2027-05-29");
    expect(calendarDayIn(instant, "America/New_York")).toBe("2027-05-28");
  });
});
