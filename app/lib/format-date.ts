/**
 * Every date and time a page shows, through one formatter that always takes a time zone: the course's
 * (or, outside a course, one the page names). Formatting in "whatever zone the process runs in" renders
 * one text on the server and another in the browser, which React reports as a hydration mismatch.
 */
const styles = {
  /** 3 Dec 2026, 09:05 */
  medium: { dateStyle: "medium", timeStyle: "short" },
  /** 3 Dec 2026, 09:05:12 — for logs, where seconds tell events apart */
  seconds: { dateStyle: "medium", timeStyle: "medium" },
  /** Thu 3 Dec 2026, 09:05 — opening and due times */
  long: { weekday: "short", day: "numeric", month: "short", year: "numeric", hour: "2-digit", minute: "2-digit" },
  /** Thu 3 Dec, 09:05 — table cells */
  short: { weekday: "short", day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" },
  /** Friday, 28 May 2027 — a calendar day, such as a return-by date */
  day: { weekday: "long", day: "numeric", month: "long", year: "numeric" },
  /** 09:05:12 — a moment of the last few minutes, such as a draft's save */
  time: { timeStyle: "medium" },
} satisfies Record<string, Intl.DateTimeFormatOptions>;

export type DateStyle = keyof typeof styles;

// A page of a thousand rows formats a thousand times: build each formatter once.
const formatters = new Map<string, Intl.DateTimeFormat>();

export function formatDateTime(at: Date | string, timeZone: string, style: DateStyle = "medium"): string {
  const key = `${style} ${timeZone}`;
  let formatter = formatters.get(key);
  if (!formatter) {
    formatter = new Intl.DateTimeFormat("en-GB", { ...styles[style], timeZone });
    formatters.set(key, formatter);
  }
  return formatter.format(typeof at === "string" ? new Date(at) : at);
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
