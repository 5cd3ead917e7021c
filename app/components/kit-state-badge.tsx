import { kitStateLabels, type KitState } from "~/lib/kits/kit-states";

/** Kit states read as words; the tint only helps the eye group them (away, home, back, out of use). */
const tints: Record<KitState, string> = {
  on_shelf: "bg-paper-100 text-ink-800",
  packed: "bg-ink-100 text-ink-800",
  in_transit: "bg-ink-200 text-ink-900",
  at_home: "bg-ink-700 text-paper-50",
  coming_back: "bg-amber-300/40 text-amber-700",
  checked_in: "bg-amber-300/20 text-ink-800",
  retired: "bg-white text-ink-600 line-through ring-1 ring-ink-900/10",
};

export function KitStateBadge({ state }: { state: KitState }) {
  return (
    <span className={`inline-block rounded-full px-2.5 py-0.5 text-xs font-medium whitespace-nowrap ${tints[state]}`}>
      {kitStateLabels[state]}
    </span>
  );
}
