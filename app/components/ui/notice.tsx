import type { ReactNode } from "react";

const tones = {
  // Dark text on white in every tone (for contrast); the tone shows in the border and the words.
  info: "border-ink-400",
  success: "border-consistent",
  warning: "border-amber-500",
  error: "border-outlier",
} as const;

/** A message about the whole form or page; errors and warnings are announced to screen readers. */
export function Notice({ tone = "info", children }: { tone?: keyof typeof tones; children: ReactNode }) {
  return (
    <div
      role={tone === "error" || tone === "warning" ? "alert" : "status"}
      className={`rounded-lg border-l-4 bg-white px-4 py-3 text-sm text-ink-950 shadow-sm ring-1 ring-ink-900/10 ${tones[tone]}`}
    >
      {children}
    </div>
  );
}
