/** The desk's filters (cohort, status, sort, all in the URL) and its pages. */
import { Link, useLocation, useNavigate } from "react-router";
import { deskStatusFilters, type DeskStatusFilter } from "~/lib/marking/desk-filters";
import type { MarkingDesk } from "~/server/marking/marking-desk.server";

const statusNames: Record<DeskStatusFilter, string> = {
  unmarked: "Not fully marked",
  flagged: "Flagged by the class comparison",
  late: "Late",
  missing: "Missing",
  "not-due": "Not due yet",
};

export function DeskFilters({
  cohorts,
  counts,
  filters,
}: Pick<MarkingDesk, "cohorts" | "counts"> & { filters: { cohort: string | null; status: string | null; sort: string | null } }) {
  const location = useLocation();
  const navigate = useNavigate();
  const withParam = (key: string, value: string | null) => {
    const params = new URLSearchParams(location.search);
    if (value) params.set(key, value);
    else params.delete(key);
    // A new filter starts at its first page, not at the student a "next to mark" link opened.
    params.delete("page");
    params.delete("student");
    return `?${params}`;
  };
  const chip = (active: boolean) =>
    `inline-flex min-h-9 items-center rounded-full px-3 text-sm ring-1 ${active ? "bg-ink-800 text-paper-50 ring-ink-800" : "bg-white ring-ink-900/20 hover:bg-paper-100"}`;
  return (
    <div className="no-print flex flex-wrap items-end gap-4">
      {cohorts.length > 1 ? (
        <label className="flex flex-col gap-1 text-sm">
          <span>Cohort</span>
          <select
            className="rounded border border-ink-900/20 bg-white px-2 py-1.5"
            value={filters.cohort ?? ""}
            onChange={(event) => navigate(withParam("cohort", event.target.value || null), { preventScrollReset: true })}
          >
            <option value="">All my cohorts</option>
            {cohorts.map((cohort) => (
              <option key={cohort.id} value={cohort.id}>
                {cohort.name}
              </option>
            ))}
          </select>
        </label>
      ) : null}
      <nav aria-label="Show" className="flex flex-wrap gap-2">
        <Link
          to={withParam("status", null)}
          preventScrollReset
          className={chip(!filters.status)}
          aria-current={!filters.status ? "page" : undefined}
        >
          Everyone ({counts.all})
        </Link>
        {deskStatusFilters.map((status) => (
          <Link
            key={status}
            to={withParam("status", status)}
            preventScrollReset
            className={chip(filters.status === status)}
            aria-current={filters.status === status ? "page" : undefined}
          >
            {statusNames[status]} ({counts[status]})
          </Link>
        ))}
      </nav>
    </div>
  );
}

export function Pages({ page, pageCount, totalRows }: { page: number; pageCount: number; totalRows: number }) {
  const location = useLocation();
  if (pageCount <= 1)
    return (
      <p className="text-sm text-ink-700">
        {totalRows} student{totalRows === 1 ? "" : "s"}
      </p>
    );
  const to = (target: number) => {
    const params = new URLSearchParams(location.search);
    params.delete("student");
    params.set("page", String(target));
    return `?${params}`;
  };
  return (
    <nav aria-label="Pages" className="no-print flex items-center gap-3 text-sm">
      {page > 1 ? (
        <Link to={to(page - 1)} className="underline">
          Previous page
        </Link>
      ) : null}
      <span>
        Page {page} of {pageCount} · {totalRows} students
      </span>
      {page < pageCount ? (
        <Link to={to(page + 1)} className="underline">
          Next page
        </Link>
      ) : null}
    </nav>
  );
}
