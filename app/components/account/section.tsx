import type { ReactNode } from "react";
import { formatDateTime } from "~/lib/format-date";

/** One panel of the account page, named by its heading. */
export function AccountSection({ id, title, children }: { id: string; title: string; children: ReactNode }) {
  return (
    <section aria-labelledby={id} className="rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
      <h2 id={id} className="mb-3 text-lg font-medium">
        {title}
      </h2>
      {children}
    </section>
  );
}

/** The account belongs to no course, so its times are in UTC (which the formatter names). */
export function formatUtc(value: Date | string): string {
  return formatDateTime(value, "UTC");
}
