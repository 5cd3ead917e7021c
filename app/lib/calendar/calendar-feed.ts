/**
 * The calendar feed as iCalendar text (RFC 5545, written by ical-generator), from the rows
 * app/server/calendar/feed.server.ts loads. Times are written in UTC (`…Z`), which every calendar shows
 * in its owner's zone; descriptions add the course's own zone in words.
 */
import ical, { ICalCalendarMethod } from "ical-generator";
import { formatCalendarDay, formatDateTime } from "~/lib/format-date";

/** One thing the feed shows, as the feed's one statement returns it. */
export type CalendarFeedRow = {
  /** `lab`: a lab's due time and cut-off (the student's own, or the class's for staff); `cohort-extension`: a cohort's (staff);
   * `kit-return`: the student's kit; `course-kit-return`: the course's return-by date (staff). */
  kind: "lab" | "cohort-extension" | "kit-return" | "course-kit-return";
  courseId: string;
  courseCode: string;
  courseTitle: string;
  timeZone: string;
  labId: string | null;
  kitId: string | null;
  /** The lab's title, or the kit's number. */
  title: string | null;
  cohortId: string | null;
  cohortName: string | null;
  dueAt: string | null;
  lateCutoffAt: string | null;
  /** The lab's own times, to say what an extension moved. */
  classDueAt: string | null;
  classLateCutoffAt: string | null;
  extendedBy: "student" | "cohort" | null;
  /** A calendar day (`2027-05-28`) in the course's zone. */
  returnBy: string | null;
};

const when = (at: string, timeZone: string) => formatDateTime(at, timeZone, "long");

/** The day after a calendar day: an all-day event ends (exclusively) on it (RFC 5545, 3.6.1). */
function nextDay(day: string): string {
  const next = new Date(`${day}T00:00:00Z`);
  next.setUTCDate(next.getUTCDate() + 1);
  return next.toISOString().slice(0, 10);
}

function windowLines(row: CalendarFeedRow): string[] {
  const lines = [`Due ${when(row.dueAt!, row.timeZone)}.`];
  if (row.extendedBy === "student") lines.push(`This is your extension; the class is due ${when(row.classDueAt!, row.timeZone)}.`);
  if (row.extendedBy === "cohort") {
    const whose = row.kind === "cohort-extension" ? `${row.cohortName}'s extension` : "Your cohort's extension";
    lines.push(`${whose}; the class is due ${when(row.classDueAt!, row.timeZone)}.`);
  }
  lines.push(
    row.lateCutoffAt
      ? `Late hand-ins are taken, and labelled late, until ${when(row.lateCutoffAt, row.timeZone)}.`
      : "No hand-ins are taken after the due time.",
  );
  return lines;
}

/**
 * The feed as iCalendar text. UIDs are stable across fetches (`<lab id>-due@benchpost`), so a calendar
 * moves an event when its time changes instead of adding another; DTSTAMP is the moment of writing.
 */
export function buildCalendarFeed(rows: CalendarFeedRow[], options: { ownerName: string; baseUrl: string; now?: Date }): string {
  const { baseUrl, now = new Date() } = options;
  const calendar = ical({
    name: `Benchpost: ${options.ownerName}`,
    prodId: { company: "Benchpost", product: "Benchpost calendar feed", language: "EN" },
    method: ICalCalendarMethod.PUBLISH,
    // Calendars that honour it look again every hour.
    ttl: 3600,
  });
  for (const row of rows) {
    const course = `${row.courseTitle} (${row.courseCode})`;
    const labUrl = `${baseUrl}/courses/${row.courseId}/labs/${row.labId}`;
    switch (row.kind) {
      case "lab":
      case "cohort-extension": {
        const key = row.kind === "lab" ? row.labId : `${row.labId}-${row.cohortId}`;
        const whose = row.kind === "lab" ? "" : ` (${row.cohortName}, extended)`;
        const url = row.kind === "lab" ? labUrl : `${labUrl}/extensions`;
        const description = [course, ...windowLines(row), url].join("\n");
        calendar.createEvent({
          id: `${key}-due@benchpost`,
          stamp: now,
          start: new Date(row.dueAt!),
          summary: `Due${whose}: ${row.title} (${row.courseCode})`,
          description,
          url,
        });
        if (row.lateCutoffAt) {
          calendar.createEvent({
            id: `${key}-cutoff@benchpost`,
            stamp: now,
            start: new Date(row.lateCutoffAt),
            summary: `Cut-off${whose}: ${row.title} (${row.courseCode})`,
            description,
            url,
          });
        }
        break;
      }
      case "kit-return":
      case "course-kit-return": {
        const student = row.kind === "kit-return";
        const url = `${baseUrl}/courses/${row.courseId}/${student ? "my-kit" : "kits/overdue"}`;
        const day = formatCalendarDay(row.returnBy!);
        calendar.createEvent({
          id: student ? `${row.kitId}-return@benchpost` : `${row.courseId}-kits-return@benchpost`,
          stamp: now,
          allDay: true,
          start: row.returnBy!,
          end: nextDay(row.returnBy!),
          summary: student ? `Kit back by: ${row.title} (${row.courseCode})` : `Kits back by (${row.courseCode})`,
          description: [
            course,
            student ? `Your kit ${row.title} must be back by the end of ${day}.` : `The course's kits must be back by the end of ${day}.`,
            url,
          ].join("\n"),
          url,
        });
        break;
      }
    }
  }
  return calendar.toString();
}
