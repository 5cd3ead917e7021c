import { useEffect, useState } from "react";
import { clocksDiffer, formatDateTime } from "~/lib/format-date";

/**
 * An opening or due time in the course's time zone, and in the viewer's own when it differs, each
 * with its zone named. The viewer's zone is only known in the browser, so it appears after hydration.
 */
export function LabTime({ at, courseTimeZone }: { at: string; courseTimeZone: string }) {
  const [viewerZone, setViewerZone] = useState<string | null>(null);
  useEffect(() => setViewerZone(Intl.DateTimeFormat().resolvedOptions().timeZone), []);
  const courseText = formatDateTime(at, courseTimeZone, "long");
  // Only when the viewer's clock reads another time: UTC beside London's GMT would say the same twice.
  const own = viewerZone && clocksDiffer(at, courseTimeZone, viewerZone) ? formatDateTime(at, viewerZone, "long") : null;
  return (
    <span>
      <time dateTime={at}>{courseText}</time>
      {own ? <span className="block text-sm text-ink-700">{own}, where you are</span> : null}
    </span>
  );
}
