/**
 * The inventory-style table: TanStack Table for columns and row selection, with paging, sorting and
 * filtering done by the server through the URL's search parameters, so a large inventory never
 * travels to the browser whole and every view can be bookmarked.
 */
import { flexRender, getCoreRowModel, useReactTable, type ColumnDef, type RowSelectionState } from "@tanstack/react-table";
import { useState } from "react";
import { Link, useLocation } from "react-router";
import { tableHeadClass } from "./table-head";

export type PageInfo = { page: number; pageSize: number; total: number };

export function DataTable<Row extends { id: string }>({
  caption,
  columns,
  rows,
  pageInfo,
  selectable = false,
  renderSelectionActions,
  empty = "Nothing here yet.",
  rowLabel,
}: {
  caption: string;
  columns: ColumnDef<Row, unknown>[];
  rows: Row[];
  pageInfo: PageInfo;
  selectable?: boolean;
  /** Actions on the selected rows, e.g. a bulk state change; receives the selected ids. */
  renderSelectionActions?: (selectedIds: string[], clear: () => void) => React.ReactNode;
  empty?: string;
  /** Names a row for its selection checkbox, e.g. "kit K-01"; without it the row's position is used. */
  rowLabel?: (row: Row) => string;
}) {
  const [rowSelection, setRowSelection] = useState<RowSelectionState>({});
  const table = useReactTable({
    data: rows,
    columns: selectable ? [selectionColumn<Row>(rowLabel), ...columns] : columns,
    getRowId: (row) => row.id,
    state: { rowSelection },
    onRowSelectionChange: setRowSelection,
    enableRowSelection: selectable,
    getCoreRowModel: getCoreRowModel(),
    manualPagination: true,
    manualSorting: true,
    manualFiltering: true,
  });
  const selectedIds = Object.keys(rowSelection).filter((id) => rowSelection[id]);

  return (
    <div className="flex flex-col gap-3">
      {selectable && renderSelectionActions && selectedIds.length > 0 ? (
        <div className="no-print flex flex-wrap items-center gap-3 rounded-md bg-paper-100 px-3 py-2 text-sm">
          <span>{selectedIds.length} selected</span>
          {renderSelectionActions(selectedIds, () => setRowSelection({}))}
        </div>
      ) : null}
      {/* Focusable so that a keyboard can scroll a table wider than a phone's screen. */}
      <div
        role="region"
        aria-label={caption}
        tabIndex={0}
        className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-ink-700"
      >
        <table className="min-w-full text-left text-sm">
          <caption className="sr-only">{caption}</caption>
          <thead className={tableHeadClass}>
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id}>
                {group.headers.map((header) => (
                  <th key={header.id} scope="col" className="px-3 py-2 font-medium">
                    {header.isPlaceholder ? null : flexRender(header.column.columnDef.header, header.getContext())}
                  </th>
                ))}
              </tr>
            ))}
          </thead>
          <tbody className="divide-y divide-ink-900/5">
            {table.getRowModel().rows.length === 0 ? (
              <tr>
                <td colSpan={table.getAllColumns().length} className="px-3 py-6 text-center text-ink-600">
                  {empty}
                </td>
              </tr>
            ) : (
              table.getRowModel().rows.map((row) => (
                <tr key={row.id} className={row.getIsSelected() ? "bg-amber-300/15" : undefined}>
                  {row.getVisibleCells().map((cell) => (
                    <td key={cell.id} className="px-3 py-2 align-top">
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
      <Pager pageInfo={pageInfo} />
    </div>
  );
}

function selectionColumn<Row>(rowLabel?: (row: Row) => string): ColumnDef<Row, unknown> {
  return {
    id: "select",
    header: ({ table }) => (
      <input
        type="checkbox"
        className="size-5 align-middle"
        aria-label="Select all rows on this page"
        checked={table.getIsAllRowsSelected()}
        onChange={table.getToggleAllRowsSelectedHandler()}
      />
    ),
    cell: ({ row }) => (
      <input
        type="checkbox"
        className="size-5 align-middle"
        aria-label={`Select ${rowLabel ? rowLabel(row.original) : `row ${row.index + 1}`}`}
        checked={row.getIsSelected()}
        onChange={row.getToggleSelectedHandler()}
      />
    ),
  };
}

/** Links to the previous and next page that keep every other search parameter (filters, search). */
export function Pager({ pageInfo }: { pageInfo: PageInfo }) {
  const location = useLocation();
  const pages = Math.max(1, Math.ceil(pageInfo.total / pageInfo.pageSize));
  const linkTo = (page: number) => {
    const params = new URLSearchParams(location.search);
    params.set("page", String(page));
    return `${location.pathname}?${params}`;
  };
  const first = pageInfo.total === 0 ? 0 : (pageInfo.page - 1) * pageInfo.pageSize + 1;
  const last = Math.min(pageInfo.total, pageInfo.page * pageInfo.pageSize);
  return (
    <nav aria-label="Pages" className="no-print flex items-center justify-between text-sm text-ink-700">
      <span>
        {first}–{last} of {pageInfo.total}
      </span>
      <span className="flex gap-2">
        {pageInfo.page > 1 ? (
          <Link to={linkTo(pageInfo.page - 1)} className="rounded px-3 py-1.5 ring-1 ring-ink-900/20">
            Previous
          </Link>
        ) : null}
        {pageInfo.page < pages ? (
          <Link to={linkTo(pageInfo.page + 1)} className="rounded px-3 py-1.5 ring-1 ring-ink-900/20">
            Next
          </Link>
        ) : null}
      </span>
    </nav>
  );
}
