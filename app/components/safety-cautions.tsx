/**
 * The general cautions for falling-sphere kits, shown wherever the kit is handled: kit pages, packing
 * slips and lab pages. They defer to the institution's own rules.
 */
export const safetyCautions = [
  "Neodymium retrieval magnets: keep them away from young children and pets — two swallowed magnets can cause serious internal injury. They pinch fingers. Keep them away from pacemakers and other implanted devices.",
  "Glass columns can tip over and break: stand the column on a stable base and work over a tray.",
  "Steel spheres are a choking hazard for small children.",
  "Spilled syrup makes floors slippery: wipe it up at once.",
  "Never heat a closed bottle.",
] as const;

export function SafetyCautions({ compact = false }: { compact?: boolean }) {
  return (
    <aside aria-labelledby="safety-heading" className={`rounded-lg border-l-4 border-amber-500 bg-amber-300/15 ${compact ? "p-3 text-sm" : "p-4"}`}>
      <h2 id="safety-heading" className="font-semibold text-amber-700">
        Safety
      </h2>
      <ul className="mt-2 list-disc space-y-1 pl-5">
        {safetyCautions.map((caution) => (
          <li key={caution}>{caution}</li>
        ))}
      </ul>
      <p className="mt-2 text-xs text-ink-700">
        These are general cautions. Your institution's lab-safety rules and local regulations come first.
      </p>
    </aside>
  );
}
