import { Notice } from "~/components/ui/notice";
import type { Moderation } from "~/server/marking/moderation.server";

/** The marks whose hand-in's result was revised after they were given: they stay as they are until someone marks them again. */
export function ResultChanged({ entries }: { entries: Moderation["resultChanged"] }) {
  return (
    <Notice tone="warning">
      <p className="font-medium">Result changed since it was marked ({entries.length})</p>
      <p>
        A part these hand-ins used was re-measured and their reduction revised; their marks are unchanged until someone marks them again.
      </p>
      <ul className="mt-1 list-disc pl-5" data-testid="result-changed-list">
        {entries.map((entry) => (
          <li key={entry.membershipId}>
            {entry.name}: {entry.oldFigure?.toFixed(3) ?? "—"} → {entry.newFigure?.toFixed(3) ?? "—"} × ref
            {entry.reoffered ? `; ${entry.reoffered} automatic criteria now suggest other points` : ""}
            {entry.released ? " — released: review this mark" : ""}
          </li>
        ))}
      </ul>
    </Notice>
  );
}
