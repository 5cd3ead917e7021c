/**
 * The safety cautions (app/lib/safety/cautions.ts) as an aside, shown wherever the kit is handled:
 * kit pages, the student's kit page, lab pages and the packing slip.
 */
import { safetyCautions, safetyCautionsDeferral } from "~/lib/safety/cautions";

export function SafetyCautions({ compact = false }: { compact?: boolean }) {
  return (
    <aside
      aria-labelledby="safety-heading"
      className={`rounded-lg border-l-4 border-amber-500 bg-amber-300/15 ${compact ? "p-3 text-sm" : "p-4"}`}
    >
      <h2 id="safety-heading" className="font-semibold text-amber-700">
        Safety
      </h2>
      <ul className="mt-2 list-disc space-y-1 pl-5">
        {safetyCautions.map((caution) => (
          <li key={caution.topic}>
            <strong className="font-medium">{caution.topic}.</strong> {caution.text}
          </li>
        ))}
      </ul>
      <p className="mt-2 text-xs text-ink-700">{safetyCautionsDeferral}</p>
    </aside>
  );
}
