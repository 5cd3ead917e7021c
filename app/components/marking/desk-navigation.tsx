/**
 * The desk's way about, all in the URL: the criterion ladder (which criterion the class is marked on,
 * with each one's progress), the legend of hand-in states with their counts (a state is a filter),
 * the cohort, and the pages.
 */
import { Link, useLocation, useNavigate } from "react-router";
import type { DeskStatusFilter } from "~/lib/marking/desk-filters";
import { stateFamilies, stateFamilyTitles, stateWords } from "~/lib/marking/status-words";
import { counted } from "~/lib/plural";
import type { MarkingDesk } from "~/server/marking/marking-desk.server";
import { StateShapeIcon, StateShapeSymbols } from "./state-mark";

/** The current search with `key` set (or removed); a new choice starts at its first page, not at a student's card or the next to score. */
function useWithParam() {
  const location = useLocation();
  return (key: string, value: string | null) => {
    const params = new URLSearchParams(location.search);
    if (value) params.set(key, value);
    else params.delete(key);
    params.delete("page");
    params.delete("student");
    params.delete("after");
    return `?${params}`;
  };
}

const kindWords = { levels: "levels", range: "points", auto: "automatic" } as const;

/**
 * The criteria as a ladder of steps, each with how many hand-ins have its points: the marker climbs
 * it one criterion at a time, the whole class per step.
 */
export function CriterionLadder({ criteria, current }: { criteria: MarkingDesk["criteria"]; current: string | null }) {
  const withParam = useWithParam();
  return (
    <nav aria-label="Criterion to mark" className="no-print">
      <ol className="grid grid-cols-1 gap-1.5 sm:grid-cols-2 xl:grid-cols-4">
        {criteria.map((criterion, index) => {
          const active = criterion.id === current;
          const share = criterion.handedIn ? criterion.scored / criterion.handedIn : 0;
          return (
            <li key={criterion.id}>
              <Link
                to={withParam("criterion", criterion.id)}
                preventScrollReset
                aria-current={active ? "step" : undefined}
                className={`flex min-h-11 items-center gap-2 rounded-md border-l-4 bg-white px-2 py-1.5 text-sm ring-1 ring-ink-900/10 hover:bg-paper-100 ${
                  active ? "border-amber-500 font-semibold" : "border-transparent"
                }`}
              >
                <span className="w-5 shrink-0 text-right text-xs text-ink-700 tabular-nums" aria-hidden="true">
                  {index + 1}
                </span>
                <span className="flex min-w-0 flex-1 flex-col">
                  <span className="break-words">{criterion.title}</span>
                  <span className="text-xs font-normal text-ink-700">
                    {kindWords[criterion.kind]} · {criterion.scored} of {counted(criterion.handedIn, "hand-in", "hand-ins")} scored
                  </span>
                </span>
                {/* The share scored as a bar; the words beside it say the same. */}
                <span className="h-1.5 w-10 shrink-0 overflow-hidden rounded-full bg-paper-200" aria-hidden="true">
                  <span className="block h-full bg-ink-700" style={{ width: `${Math.round(share * 100)}%` }} />
                </span>
              </Link>
            </li>
          );
        })}
      </ol>
    </nav>
  );
}

/**
 * The hand-in states as a legend: each state's shape, word and count, grouped by what it is about.
 * Choosing one shows only those hand-ins; "everyone" shows all.
 */
export function StateLegend({
  cohorts,
  counts,
  filters,
}: Pick<MarkingDesk, "cohorts" | "counts"> & { filters: { cohort: string | null; status: string | null } }) {
  const withParam = useWithParam();
  const navigate = useNavigate();
  const entry = (status: DeskStatusFilter | null, body: React.ReactNode, count: number) => {
    const active = (filters.status ?? null) === status;
    return (
      <li key={status ?? "everyone"}>
        <Link
          to={withParam("status", status)}
          preventScrollReset
          aria-current={active ? "true" : undefined}
          className={`flex min-h-8 items-center justify-between gap-3 rounded px-1.5 hover:bg-paper-100 ${active ? "bg-paper-200 font-semibold" : ""}`}
        >
          <span className="flex items-center gap-1.5">{body}</span>
          <span className="tabular-nums">{count}</span>
        </Link>
      </li>
    );
  };
  return (
    <section
      aria-label="Show hand-ins by state"
      className="no-print flex flex-col gap-3 rounded-lg bg-paper-50 p-3 text-sm ring-1 ring-ink-900/10"
    >
      {/* Once for the legend and every card of the desk. */}
      <StateShapeSymbols />
      {cohorts.length > 1 ? (
        <label className="flex flex-col gap-1">
          <span className="text-xs font-medium text-ink-700">Cohort</span>
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
      <ul className="flex flex-col">
        {entry(null, <span>Everyone</span>, counts.all)}
        {entry("waiting", <span>Waiting for a score</span>, counts.waiting)}
      </ul>
      <div className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-1">
        {(Object.keys(stateFamilies) as (keyof typeof stateFamilies)[]).map((family) => (
          <div key={family}>
            <h3 className="mb-0.5 text-xs font-medium text-ink-700">{stateFamilyTitles[family]}</h3>
            <ul className="flex flex-col">
              {stateFamilies[family].map((state) =>
                entry(
                  state,
                  <>
                    <StateShapeIcon state={state} shared />
                    <span title={stateWords[state].sentence}>{stateWords[state].word}</span>
                  </>,
                  counts[state],
                ),
              )}
            </ul>
          </div>
        ))}
      </div>
    </section>
  );
}

export function Pages({ page, pageCount, totalRows }: { page: number; pageCount: number; totalRows: number }) {
  const location = useLocation();
  if (pageCount <= 1) return <p className="text-sm text-ink-700">{counted(totalRows, "hand-in card", "hand-in cards")}</p>;
  const to = (target: number) => {
    const params = new URLSearchParams(location.search);
    params.delete("student");
    params.delete("after");
    params.set("page", String(target));
    return `?${params}`;
  };
  return (
    <nav aria-label="Pages" className="no-print flex flex-wrap items-center gap-3 text-sm">
      {page > 1 ? (
        <Link to={to(page - 1)} className="underline">
          Previous page
        </Link>
      ) : null}
      <span>
        Page {page} of {pageCount} · {counted(totalRows, "hand-in card", "hand-in cards")}
      </span>
      {page < pageCount ? (
        <Link to={to(page + 1)} className="underline">
          Next page
        </Link>
      ) : null}
    </nav>
  );
}
