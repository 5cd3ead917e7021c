import { useEffect } from "react";
import { useRevalidator } from "react-router";
import { formatDateTime } from "~/lib/format-date";
import type { RereductionProgress } from "~/server/kits/rereduce.server";
import { counted } from "~/lib/plural";

/** How often the page reloads its data while a re-reduction runs. */
const PROGRESS_POLL_MS = 1500;

/** The part's recent re-reductions with their progress; the page refreshes itself until they finish. */
export function RereductionList({ runs, timeZone }: { runs: RereductionProgress[]; timeZone: string }) {
  const revalidator = useRevalidator();
  const running = runs.some((run) => !run.finishedAt);
  useEffect(() => {
    if (!running) return;
    const timer = setInterval(() => {
      if (revalidator.state === "idle") void revalidator.revalidate();
    }, PROGRESS_POLL_MS);
    return () => clearInterval(timer);
  }, [running, revalidator]);
  if (runs.length === 0) return null;
  return (
    <section aria-labelledby="rereduction-heading">
      <h2 id="rereduction-heading" className="mb-2 text-lg font-semibold">
        Reduction revisions
      </h2>
      <ul className="flex flex-col gap-1 text-sm" aria-live="polite">
        {runs.map((run) => (
          <li key={run.id} data-testid="rereduction-progress">
            <time dateTime={run.createdAt}>{formatDateTime(run.createdAt, timeZone)}</time>: {run.done} of{" "}
            {counted(run.total, "hand-in", "hand-ins")} recomputed
            {run.finishedAt ? " — finished; the class comparison is relabelled." : " — running…"}
          </li>
        ))}
      </ul>
    </section>
  );
}
