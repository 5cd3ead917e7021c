import { describe, expect, it } from "vitest";
import { carryOverInput, shiftByCalendarDays, shiftCalendarDay } from "./carry-over-input";

describe("shiftByCalendarDays", () => {
  it("keeps the wall-clock time across a daylight-saving change (Europe/Dublin: GMT to IST on 29 March 2026)", () => {
    const due = new Date("2026-03-20T23:59:00Z"); // 23:59 GMT
    expect(shiftByCalendarDays(due, 14, "Europe/Dublin", "Europe/Dublin").toISOString()).toBe("2026-04-03T22:59:00.000Z");
    // Back again, and the other way round in autumn (IST to GMT on 25 October 2026).
    expect(shiftByCalendarDays(new Date("2026-04-03T22:59:00Z"), -14, "Europe/Dublin", "Europe/Dublin").toISOString()).toBe(
      "2026-03-20T23:59:00.000Z",
    );
    expect(shiftByCalendarDays(new Date("2026-10-20T08:00:00Z"), 7, "Europe/Dublin", "Europe/Dublin").toISOString()).toBe(
      "2026-10-27T09:00:00.000Z",
    );
  });

  it("places the same local time in a new zone", () => {
    expect(shiftByCalendarDays(new Date("2026-03-20T23:59:00Z"), 0, "Europe/Dublin", "Asia/Tokyo").toISOString()).toBe(
      "2026-03-20T14:59:00.000Z",
    );
  });
});

describe("shiftCalendarDay", () => {
  it("crosses month ends and leap days", () => {
    expect(shiftCalendarDay("2027-02-20", 14)).toBe("2027-03-06");
    expect(shiftCalendarDay("2028-02-20", 14)).toBe("2028-03-05");
    expect(shiftCalendarDay("2027-01-03", -7)).toBe("2026-12-27");
  });
});

describe("carryOverInput", () => {
  const typed = { title: "Fluids at Home", code: "FM 210", term: "2027 Autumn", timeZone: "Europe/Dublin" };

  it("reads the days as typed and the cohorts box as ticked or not", () => {
    expect(carryOverInput.parse({ ...typed, shiftDays: " 182 ", copyCohorts: "on" })).toMatchObject({ shiftDays: 182, copyCohorts: true });
    expect(carryOverInput.parse({ ...typed, shiftDays: "-7" })).toMatchObject({ shiftDays: -7, copyCohorts: false });
  });

  it("refuses a fraction of a day and a blank", () => {
    expect(carryOverInput.safeParse({ ...typed, shiftDays: "3,5" }).error?.issues[0].message).toBe("Enter a whole number of days.");
    expect(carryOverInput.safeParse({ ...typed, shiftDays: "" }).success).toBe(false);
  });
});
