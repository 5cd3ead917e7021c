import type { ReactNode } from "react";
import { Link } from "react-router";

/** The title block of a page: where you are (breadcrumbs), what the page is, and its main actions. */
export function PageHeader({
  id,
  title,
  trail = [],
  actions,
  tabs,
  children,
}: {
  /** For sections that name the page with aria-labelledby. */
  id?: string;
  title: ReactNode;
  trail?: { to: string; label: string }[];
  actions?: ReactNode;
  /** The rooms of what this page belongs to, drawn under the title. */
  tabs?: ReactNode;
  children?: ReactNode;
}) {
  return (
    <header className="mb-6">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          {trail.length ? (
            <nav aria-label="Breadcrumbs" className="no-print mb-1 text-sm text-ink-600">
              {trail.map((crumb, index) => (
                <span key={crumb.to}>
                  {index > 0 ? " / " : null}
                  <Link to={crumb.to} className="hover:underline">
                    {crumb.label}
                  </Link>
                </span>
              ))}
            </nav>
          ) : null}
          <h1 id={id} className="text-2xl font-semibold tracking-tight">
            {title}
          </h1>
          {children ? <p className="mt-1 text-ink-700">{children}</p> : null}
        </div>
        {actions ? <div className="no-print flex flex-wrap gap-2">{actions}</div> : null}
      </div>
      {tabs}
    </header>
  );
}
