import type { ReactNode } from "react";

export function PageHeading({ id, children, lead }: { id: string; children: ReactNode; lead?: ReactNode }) {
  return (
    <header className="mb-6">
      <h1 id={id} className="text-2xl font-semibold tracking-tight">
        {children}
      </h1>
      {lead ? <p className="mt-2 text-ink-700">{lead}</p> : null}
    </header>
  );
}
