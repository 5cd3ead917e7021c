/**
 * The marking desk: one row per student, the evidence beside the rubric's cells, built on TanStack
 * Table. It is a keyboard grid: arrows move between cells and rows, a level's number key sets it,
 * Enter opens the student's hand-in beside the table, Space selects the row. Each row saves itself as
 * the marker works (see `mark-saves`); selected rows take one change together in one transaction.
 */
import { flexRender, getCoreRowModel, useReactTable, type RowSelectionState } from "@tanstack/react-table";
import { useCallback, useEffect, useMemo, useReducer, useRef, useState, type Dispatch } from "react";
import { useLocation, useNavigate } from "react-router";
import { isToMark } from "~/lib/marking/desk-filters";
import type { RubricCriterion } from "~/lib/marking/rubric";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
import { tableHeadClass } from "~/components/ui/table-head";
import { BulkBar } from "./bulk-bar";
import { deskColumns, DeskContext, moveFocus, RowContext, useDesk, type RowTools } from "./desk-cells";
import { MarkPanel } from "./mark-panel";
import { markSaves, type MarkSaveEvent, type RowSaves } from "./mark-saves";
import { useMarkSaver } from "./use-mark-saver";

export type DeskProps = {
  courseId: string;
  labId: string;
  kind: "drag" | "viscometry";
  /** The course's time zone, for students' own due times. */
  timeZone: string;
  rubric: RubricCriterion[];
  rows: MarkingDeskRow[];
  /** Every student passing the filters, on all pages. */
  matchingIds: string[];
  /** Those of them still to mark as the page was loaded, in the same order. */
  toMarkIds: string[];
  /** The student to open beside the table as the page loads (a "next to mark" link). */
  openId: string | null;
  canEdit: boolean;
  maxTotal: number;
  /** The current `sort` search parameter, e.g. `-total`. */
  sort: string | null;
};

function DeskRow({
  base,
  index,
  saves,
  dispatch,
  register,
  selected,
  children,
}: {
  base: MarkingDeskRow;
  index: number;
  saves: RowSaves | undefined;
  dispatch: Dispatch<MarkSaveEvent>;
  register: (membershipId: string, tools: RowTools | null) => void;
  selected: boolean;
  children: React.ReactNode;
}) {
  const { rubric } = useDesk();
  const action = useLocation().pathname;
  const { row, saveState, save, retry } = useMarkSaver({ action, rubric, base, saves, dispatch });
  const tools = useMemo(() => ({ row, saveState, save, retry, index }), [row, saveState, save, retry, index]);
  useEffect(() => {
    register(base.membershipId, tools);
    return () => register(base.membershipId, null);
  }, [register, base.membershipId, tools]);
  return (
    <RowContext.Provider value={tools}>
      <tr className={selected ? "bg-amber-300/20" : saveState.status === "failed" ? "bg-outlier/5" : undefined}>{children}</tr>
    </RowContext.Provider>
  );
}

export function MarkingDesk({
  courseId,
  labId,
  kind,
  timeZone,
  rubric,
  rows,
  matchingIds,
  toMarkIds,
  openId: initialOpenId,
  canEdit,
  maxTotal,
  sort,
}: DeskProps) {
  const [saves, dispatch] = useReducer(markSaves, {});
  const [selection, setSelection] = useState<RowSelectionState>({});
  /** Every student matching the filters is selected, beyond this page. */
  const [allMatching, setAllMatching] = useState(false);
  const [openId, setOpenId] = useState<string | null>(initialOpenId);
  useEffect(() => setOpenId(initialOpenId), [initialOpenId]);
  const [nextNote, setNextNote] = useState("");
  const [tools, setTools] = useState<Record<string, RowTools>>({});
  const tableRef = useRef<HTMLTableElement>(null);
  const register = useCallback((membershipId: string, entry: RowTools | null) => {
    setTools((current) => {
      if (current[membershipId] === entry) return current;
      const next = { ...current };
      if (entry) next[membershipId] = entry;
      else delete next[membershipId];
      return next;
    });
  }, []);

  // A new page or filter: the selection and the open panel belong to the rows that were shown.
  const rowIds = rows.map((row) => row.membershipId).join();
  useEffect(() => {
    setSelection((current) => Object.fromEntries(Object.entries(current).filter(([id]) => rowIds.includes(id))));
    setAllMatching(false);
  }, [rowIds]);

  const columns = useMemo(() => deskColumns(rubric, sort, maxTotal), [rubric, sort, maxTotal]);

  const table = useReactTable({
    data: rows,
    columns,
    getRowId: (row) => row.membershipId,
    state: { rowSelection: selection },
    onRowSelectionChange: setSelection,
    enableRowSelection: canEdit,
    getCoreRowModel: getCoreRowModel(),
    manualPagination: true,
    manualSorting: true,
    manualFiltering: true,
  });
  const pageSelected = Object.keys(selection).filter((id) => selection[id]);
  // Unticking a row of the page takes the selection back to the ticked rows.
  const everyMatching = allMatching && pageSelected.length === rows.length;
  const selectedIds = everyMatching ? matchingIds : pageSelected;
  const clearSelection = useCallback(() => {
    setSelection({});
    setAllMatching(false);
  }, []);
  const open = useCallback((membershipId: string) => setOpenId(membershipId), []);
  const desk = useMemo(() => ({ canEdit, rubric, open, kind, timeZone }), [canEdit, rubric, open, kind, timeZone]);
  const openIndex = rows.findIndex((row) => row.membershipId === openId);
  const openTools = openId ? tools[openId] : undefined;

  // Alt+N, from anywhere on the desk: the next hand-in still to mark after the open (or focused) student,
  // in the desk's order, wrapping round. This page's rows are judged as saved since; other pages as loaded.
  const navigate = useNavigate();
  const location = useLocation();
  useEffect(() => {
    const onKeyDown = (event: KeyboardEvent) => {
      if (!event.altKey || event.ctrlKey || event.metaKey || event.code !== "KeyN") return;
      event.preventDefault();
      const focusedRow = (document.activeElement as HTMLElement | null)?.closest("[data-row]") as HTMLElement | null;
      const current = openId ?? (focusedRow ? rows[Number(focusedRow.dataset.row)]?.membershipId : undefined);
      const waiting = new Set(toMarkIds);
      const stillToMark = (id: string) => (tools[id] ? isToMark(tools[id].row) : waiting.has(id));
      const from = current ? matchingIds.indexOf(current) : -1;
      const order = [...matchingIds.slice(from + 1), ...matchingIds.slice(0, Math.max(from, 0))];
      const next = order.find(stillToMark);
      if (!next) {
        setNextNote("No other hand-in is waiting to be marked among the students shown.");
        return;
      }
      setNextNote("");
      if (rows.some((row) => row.membershipId === next)) setOpenId(next);
      else {
        const params = new URLSearchParams(location.search);
        params.delete("page");
        params.set("student", next);
        navigate(`?${params}`, { preventScrollReset: true });
      }
    };
    document.addEventListener("keydown", onKeyDown);
    return () => document.removeEventListener("keydown", onKeyDown);
  }, [openId, rows, tools, toMarkIds, matchingIds, location.search, navigate]);

  // The first control of the grid is its one tab stop, until another cell has had focus.
  useEffect(() => {
    const first = tableRef.current?.querySelector<HTMLElement>('[data-row="0"][data-col="1"]');
    if (first && !tableRef.current?.querySelector('[data-row][tabindex="0"]')) first.tabIndex = 0;
  }, [rows]);

  return (
    <DeskContext.Provider value={desk}>
      <div className="flex flex-col gap-3">
        {canEdit && pageSelected.length === rows.length && rows.length > 0 && matchingIds.length > rows.length ? (
          <p className="no-print text-sm">
            {everyMatching ? (
              <>
                All {matchingIds.length} students matching the filters are selected.{" "}
                <button type="button" className="underline" onClick={() => setAllMatching(false)}>
                  Only this page
                </button>
              </>
            ) : (
              <>
                The {rows.length} students on this page are selected.{" "}
                <button type="button" className="underline" onClick={() => setAllMatching(true)}>
                  Select all {matchingIds.length} that match the filters
                </button>
              </>
            )}
          </p>
        ) : null}
        {canEdit ? <BulkBar rubric={rubric} selectedIds={selectedIds} clear={clearSelection} /> : null}
        <div className="flex flex-col gap-4 xl:flex-row xl:items-start">
          <div
            role="region"
            aria-label="Marks"
            tabIndex={-1}
            className="min-w-0 flex-1 overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10"
          >
            <table
              ref={tableRef}
              className="min-w-full text-left text-sm"
              aria-describedby="desk-keys"
              onKeyDown={(event) => {
                const target = event.target as HTMLElement;
                if (target.dataset.row === undefined || !tableRef.current) return;
                const row = table.getRowModel().rows[Number(target.dataset.row)];
                if (event.key === "Enter" && target.tagName === "SELECT") {
                  event.preventDefault();
                  open(row.original.membershipId);
                } else if (event.key === " " && canEdit && !(target instanceof HTMLInputElement)) {
                  // Space selects the row from any cell; in a text field it stays a space.
                  event.preventDefault();
                  row.toggleSelected();
                } else moveFocus(event, tableRef.current);
              }}
              onFocus={(event) => {
                // Roving tab stop: the cell last focused is where Tab comes back to.
                const target = event.target as HTMLElement;
                if (target.dataset.row === undefined) return;
                tableRef.current
                  ?.querySelectorAll<HTMLElement>('[data-row][tabindex="0"]')
                  .forEach((cell) => cell !== target && (cell.tabIndex = -1));
                target.tabIndex = 0;
              }}
            >
              <caption className="sr-only">Marks of the students shown, one row each</caption>
              <thead className={tableHeadClass}>
                {table.getHeaderGroups().map((group) => (
                  <tr key={group.id}>
                    {group.headers.map((header) => (
                      <th key={header.id} scope="col" className="px-2 py-2 align-bottom font-medium">
                        {flexRender(header.column.columnDef.header, header.getContext())}
                      </th>
                    ))}
                  </tr>
                ))}
              </thead>
              <tbody className="divide-y divide-ink-900/5">
                {table.getRowModel().rows.length === 0 ? (
                  <tr>
                    <td colSpan={columns.length} className="px-3 py-6 text-center text-ink-600">
                      No students match these filters.
                    </td>
                  </tr>
                ) : (
                  table.getRowModel().rows.map((row, index) => (
                    <DeskRow
                      key={row.id}
                      base={row.original}
                      index={index}
                      saves={saves[row.id]}
                      dispatch={dispatch}
                      register={register}
                      selected={row.getIsSelected()}
                    >
                      {row.getVisibleCells().map((cell) => (
                        <td key={cell.id} className="px-2 py-1.5 align-middle">
                          {flexRender(cell.column.columnDef.cell, cell.getContext())}
                        </td>
                      ))}
                    </DeskRow>
                  ))
                )}
              </tbody>
            </table>
          </div>
          {openTools ? (
            <MarkPanel
              key={openId}
              courseId={courseId}
              labId={labId}
              timeZone={timeZone}
              rubric={rubric}
              canEdit={canEdit}
              row={openTools.row}
              saveState={openTools.saveState}
              save={openTools.save}
              retry={openTools.retry}
              onClose={() => {
                setOpenId(null);
                tableRef.current?.querySelector<HTMLElement>(`[data-row="${openIndex}"][data-col="1"]`)?.focus();
              }}
              onStep={(step) => {
                const next = rows[openIndex + step];
                if (next) setOpenId(next.membershipId);
              }}
              position={{ index: openIndex, count: rows.length }}
            />
          ) : null}
        </div>
        <p id="desk-keys" className="text-xs text-ink-700">
          Keys: arrows move between cells and rows; a level&apos;s number sets it and Delete clears it; type points and press Enter; Enter
          on a student or an automatic cell opens the hand-in beside the table; Space selects the row; Alt+N, from anywhere on the desk,
          opens the next hand-in still to mark.
        </p>
        <p role="status" className="text-sm">
          {nextNote}
        </p>
      </div>
    </DeskContext.Provider>
  );
}
