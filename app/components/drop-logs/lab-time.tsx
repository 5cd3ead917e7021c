import { useEffect, useState } from "react";

function format(iso: string, timeZone: string): string {
  return new Intl.DateTimeFormat("en-GB", { timeZone, weekday: "short", day: "numeric", month: "short", year: "numeric", hour: "2-digit", minute: "2-digit" }).format(new Date(iso));
}

/**
 * An opening or due time in the course's time zone, and in the viewer's own when it differs. The
 * viewer's zone is only known in the browser, so it appears after hydration.
 */
export function LabTime({ at, courseTimeZone }: { at: string; courseTimeZone: string }) {
  const [viewerZone, setViewerZone] = useState<string | null>(null);
  useEffect(() => setViewerZone(Intl.DateTimeFormat().resolvedOptions().timeZone), []);
  const courseText = format(at, courseTimeZone);
  const own = viewerZone && viewerZone !== courseTimeZone ? format(at, viewerZone) : null;
  return (
    <span>
      <time dateTime={at}>{courseText}</time> <span className="text-ink-600">({courseTimeZone})</span>
      {own && own !== courseText ? (
        <span className="block text-sm text-ink-700">
          {own} your time ({viewerZone})
        </span>
      ) : null}
    </span>
  );
}
