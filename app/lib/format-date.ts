/**
 * Every date and time a page or an e-mail shows, in one style, through one formatter that always takes a
 * time zone: the course's (outside a course, UTC). Formatting in "whatever zone the process runs in"
 * renders one text on the server and another in the browser, which React reports as a hydration mismatch.
 *
 * The rule, everywhere:
 * - a date reads day, short month, year ("3 Dec 2026"), with the short weekday in front where the day of
 *   the week matters ("Thu, 3 Dec 2026"); times are on the 24-hour clock;
 * - every time of day names its zone, by the short name the language's rules give it ("09:05 GMT",
 *   "10:05 CET", "04:05 GMT-5"), in the same text, so a student abroad, a forwarded e-mail or a copied
 *   line never leaves the clock in doubt;
 * - a calendar day (a return-by or sent-on date) names no zone: it is the same day wherever it is read.
 * CSV exports and the API write instants as ISO 8601 with their offset ("2026-12-03T09:05:00.000Z")
 * instead: they are read by programs.
 */
type Shape = { weekday: boolean; date: "with-year" | "without-year" | null; time: "minutes" | "seconds" | null };

const styles = {
  /** 3 Dec 2026, 09:05 GMT */
  medium: { weekday: false, date: "with-year", time: "minutes" },
  /** 3 Dec 2026, 09:05:12 GMT — for logs, where seconds tell events apart */
  seconds: { weekday: false, date: "with-year", time: "seconds" },
  /** Thu, 3 Dec 2026, 09:05 GMT — opening and due times */
  long: { weekday: true, date: "with-year", time: "minutes" },
  /** Thu, 3 Dec, 09:05 GMT — table cells */
  short: { weekday: true, date: "without-year", time: "minutes" },
  /** Fri, 28 May 2027 — a calendar day, such as a return-by date */
  day: { weekday: true, date: "with-year", time: null },
  /** 09:05:12 GMT — a moment of the last few minutes, such as a draft's save */
  time: { weekday: false, date: null, time: "seconds" },
} satisfies Record<string, Shape>;

export type DateStyle = keyof typeof styles;

// A page of a thousand rows formats a thousand times: one formatter per zone, built once. The text is put
// together from its parts, so every style has the same order and punctuation whatever the locale's
// patterns do with a weekday or a missing year.
const formatters = new Map<string, Intl.DateTimeFormat>();

function partsOf(at: Date, timeZone: string): Record<Intl.DateTimeFormatPartTypes, string> {
  let formatter = formatters.get(timeZone);
  if (!formatter) {
    formatter = new Intl.DateTimeFormat("en-GB", {
      timeZone,
      weekday: "short",
      day: "numeric",
      month: "short",
      year: "numeric",
      hour: "2-digit",
      minute: "2-digit",
      second: "2-digit",
      hourCycle: "h23",
      timeZoneName: "short",
    });
    formatters.set(timeZone, formatter);
  }
  return Object.fromEntries(formatter.formatToParts(at).map((part) => [part.type, part.value])) as Record<
    Intl.DateTimeFormatPartTypes,
    string
  >;
}

export function formatDateTime(at: Date | string, timeZone: string, style: DateStyle = "medium"): string {
  const shape: Shape = styles[style];
  const part = partsOf(typeof at === "string" ? new Date(at) : at, timeZone);
  const day = shape.date ? `${part.day} ${part.month}${shape.date === "with-year" ? ` ${part.year}` : ""}` : null;
  const time = shape.time ? `${part.hour}:${part.minute}${shape.time === "seconds" ? `:${part.second}` : ""} ${part.timeZoneName}` : null;
  return [shape.weekday ? part.weekday : null, day, time].filter(Boolean).join(", ");
}

/** Whether two zones' clocks read differently at an instant: London and UTC agree in winter, under two names. */
export function clocksDiffer(at: Date | string, zone: string, otherZone: string): boolean {
  const instant = typeof at === "string" ? new Date(at) : at;
  const reading = (timeZone: string) => {
    const { timeZoneName: _name, ...clock } = partsOf(instant, timeZone);
    return JSON.stringify(clock);
  };
  return reading(zone) !== reading(otherZone);
}

/**
 * A calendar day ("2027-05-28") as words. It names a day in its course's zone already, so it is read at
 * noon UTC and shown in UTC: no zone can move it to the day before or after.
 */
export function formatCalendarDay(day: string): string {
  return formatDateTime(`${day}T12:00:00Z`, "UTC", "day");
}

/** The calendar day ("2027-05-28") that an instant falls on in a time zone, e.g. today in the course's zone. */
export function calendarDayIn(at: Date, timeZone: string): string {
  const parts = new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" }).formatToParts(at);
  const part = (type: string) => parts.find((item) => item.type === type)!.value;
  return `${part("year")}-${part("month")}-${part("day")}`;
}
