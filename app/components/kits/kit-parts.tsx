import { describePart } from "~/lib/kits/describe-part";
import type { PartStatus } from "~/lib/kits/part-display";

export type KitPart = Parameters<typeof describePart>[0] & { id: string; status: PartStatus };

/** What is in the kit, one line per part, with any part that is out of service said so. */
export function KitParts({ parts }: { parts: KitPart[] }) {
  return (
    <section aria-labelledby="parts-heading">
      <h2 id="parts-heading" className="mb-2 text-lg font-semibold">
        What is in it
      </h2>
      <ul className="divide-y divide-ink-900/5 rounded-lg bg-white ring-1 ring-ink-900/10">
        {parts.map((part) => {
          const { kind, values } = describePart(part);
          return (
            <li key={part.id} className="flex flex-wrap gap-x-3 px-3 py-2 text-sm">
              <strong className="min-w-20">{part.label}</strong>
              <span className="min-w-24 text-ink-600">{kind}</span>
              <span>{values}</span>
              {part.status !== "in_service" ? (
                <span className="font-medium text-outlier">{part.status === "remeasure" ? "needs re-measuring" : "retired"}</span>
              ) : null}
            </li>
          );
        })}
      </ul>
    </section>
  );
}
