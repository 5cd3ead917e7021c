import type { ReactNode } from "react";

/** The heading row of a plain data table, in the one style every table of the app uses. */
export const tableHeadClass = "bg-paper-100 text-xs uppercase tracking-wide text-ink-700";

export function TableHead({ headers }: { headers: string[] | { key: string; label: ReactNode }[] }) {
  return (
    <thead className={tableHeadClass}>
      <tr>
        {headers.map((header) => {
          const { key, label } = typeof header === "string" ? { key: header, label: header } : header;
          return (
            <th key={key} scope="col" className="px-3 py-2 font-medium">
              {label}
            </th>
          );
        })}
      </tr>
    </thead>
  );
}
