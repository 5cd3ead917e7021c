import { Link, useLocation } from "react-router";

/**
 * A column heading that sorts a server-paged table by it (again: the other way) through the URL's
 * `sort` (`key` ascending, `-key` descending), so it works without JavaScript; sorting starts again at page 1.
 */
export function SortHeader<Key extends string>({ label, by, sort }: { label: string; by: Key; sort: string | null }) {
  const location = useLocation();
  const current = sort === by ? "asc" : sort === `-${by}` ? "desc" : null;
  const params = new URLSearchParams(location.search);
  params.set("sort", current === "asc" ? `-${by}` : by);
  params.delete("page");
  return (
    <Link
      to={`?${params}`}
      preventScrollReset
      className="inline-flex min-h-6 items-center gap-1 underline-offset-2 hover:underline"
      aria-label={`${label}, sort ${current === "asc" ? "descending" : "ascending"}`}
    >
      {label}
      <span aria-hidden="true">{current === "asc" ? "▲" : current === "desc" ? "▼" : ""}</span>
    </Link>
  );
}
