/**
 * "Start next term from this course": what the instructor types, and how every date moves. Shared by
 * the form's preview (in the browser and on the server) and the carry-over itself, so the times the
 * preview shows are the times the new course gets.
 */
import { TZDate } from "@date-fns/tz";
import { z } from "zod";
import { typedNumber } from "~/lib/forms/typed-number";
import { courseInput } from "./course-input";

export const carryOverInput = courseInput.pick({ title: true, code: true, term: true, timeZone: true }).extend({
  /** Whole days every date moves by; a multiple of 7 keeps each lab on its weekday. */
  shiftDays: typedNumber(
    z
      .number({ error: "Enter the number of days the lab dates move by, e.g. 182 for 26 weeks." })
      .int("Enter a whole number of days.")
      .min(-3660, "Move the dates by at most ten years.")
      .max(3660, "Move the dates by at most ten years."),
  ),
  copyCohorts: z.preprocess((value) => value === "on", z.boolean()),
});
export type CarryOverInput = z.infer<typeof carryOverInput>;

/**
 * The instant `days` calendar days after `at`, at the same wall-clock time: read in the old course's
 * zone, placed in the new one's. Across a daylight-saving change a due time of 23:59 stays 23:59,
 * which adding 24-hour days would not. A time the clocks skip on the new day moves past the gap.
 */
export function shiftByCalendarDays(at: Date, days: number, fromZone: string, toZone: string): Date {
  const local = new TZDate(at.getTime(), fromZone);
  const shifted = new TZDate(
    local.getFullYear(),
    local.getMonth(),
    local.getDate() + days,
    local.getHours(),
    local.getMinutes(),
    local.getSeconds(),
    local.getMilliseconds(),
    toZone,
  );
  return new Date(shifted.getTime());
}

/** A calendar day ("2027-05-28") `days` days later. */
export function shiftCalendarDay(day: string, days: number): string {
  const [year, month, date] = day.split("-").map(Number);
  return new Date(Date.UTC(year, month - 1, date + days)).toISOString().slice(0, 10);
}

export type LabTimes = { opensAt: Date; dueAt: Date; lateCutoffAt: Date | null };

/** A lab's opening, due time and cut-off in the new course. */
export function shiftLabTimes(lab: LabTimes, days: number, fromZone: string, toZone: string): LabTimes {
  const shift = (at: Date) => shiftByCalendarDays(at, days, fromZone, toZone);
  return { opensAt: shift(lab.opensAt), dueAt: shift(lab.dueAt), lateCutoffAt: lab.lateCutoffAt && shift(lab.lateCutoffAt) };
}
