/**
 * Opening and due times are typed as wall-clock times in the course's time zone ("2027-03-28T23:59"
 * from a datetime-local input) and stored as instants. The conversion goes through the zone's rules
 * (IANA data via @date-fns/tz), so a due time on either side of a daylight-saving change lands where
 * the instructor meant it.
 */
import { TZDate } from "@date-fns/tz";

const wallClockPattern = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/;

export type WallClockResult = { ok: true; instant: Date } | { ok: false; reason: "format" | "skipped" };

/**
 * The instant of a wall-clock time in `timeZone`. A time inside the hour the clocks skip in spring
 * does not exist and is refused; a time in the hour repeated in autumn takes its second occurrence
 * (standard time), the later instant, so an ambiguous deadline never cuts a student's time short.
 */
export function wallClockToInstant(wallClock: string, timeZone: string): WallClockResult {
  const match = wallClockPattern.exec(wallClock.trim());
  if (!match) return { ok: false, reason: "format" };
  const [year, month, day, hour, minute] = match.slice(1).map(Number);
  const calendar = new Date(Date.UTC(year, month - 1, day, hour, minute));
  if (
    calendar.getUTCMonth() !== month - 1 ||
    calendar.getUTCDate() !== day ||
    calendar.getUTCHours() !== hour ||
    calendar.getUTCMinutes() !== minute
  ) {
    return { ok: false, reason: "format" };
  }
  const local = new TZDate(year, month - 1, day, hour, minute, timeZone);
  if (Number.isNaN(local.getTime())) return { ok: false, reason: "format" };
  // TZDate moves a skipped time forward; reading the wall clock back tells a skipped time apart.
  if (
    local.getFullYear() !== year ||
    local.getMonth() !== month - 1 ||
    local.getDate() !== day ||
    local.getHours() !== hour ||
    local.getMinutes() !== minute
  ) {
    return { ok: false, reason: "skipped" };
  }
  return { ok: true, instant: new Date(local.getTime()) };
}

const pad = (value: number) => String(value).padStart(2, "0");

/** The wall-clock time of an instant in `timeZone`, as a datetime-local input shows it. */
export function instantToWallClock(instant: Date, timeZone: string): string {
  const local = new TZDate(instant.getTime(), timeZone);
  return `${local.getFullYear()}-${pad(local.getMonth() + 1)}-${pad(local.getDate())}T${pad(local.getHours())}:${pad(local.getMinutes())}`;
}
