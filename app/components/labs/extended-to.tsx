/**
 * A student's own due time where an extension moved it ("extended to Mon 1 Nov, 09:00"), for staff
 * pages: the reason staff gave shows on hover and to screen readers. Nothing for a student on the
 * lab's own times. Short, for table cells; the course's zone is the page's.
 */
import { formatDateTime } from "~/lib/format-date";
import type { StudentDeadline } from "~/lib/drop-logs/hand-in-window";

export function ExtendedTo({ deadline, timeZone }: { deadline: StudentDeadline; timeZone: string }) {
  if (!deadline.extendedBy) return null;
  const when = formatDateTime(deadline.dueAt, timeZone, "short");
  const whose = deadline.extendedBy === "cohort" ? "cohort's extension" : "own extension";
  const reason = deadline.extensionReason ? `: ${deadline.extensionReason}` : "";
  return (
    <span className="text-ink-600" title={`${whose}${reason}`}>
      extended to <time dateTime={deadline.dueAt}>{when}</time>
      {deadline.extendedBy === "cohort" ? " (cohort)" : ""}
      <span className="sr-only">
        {" "}
        ({whose}
        {reason})
      </span>
    </span>
  );
}
