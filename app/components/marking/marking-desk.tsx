/**
 * The criterion-first marking desk: one criterion across the class, the hand-ins as cards in that
 * criterion's order and bands. Arrow keys or j/k move between cards, a number key on a card scores it,
 * Space or its box selects it, a band's button selects the whole band (on every page), and one change
 * then goes to the selection in one transaction. Alt+N goes to the next card still to score. Each card
 * saves itself as the marker works (see `mark-saves`).
 */
import { useCallback, useEffect, useReducer, useRef, useState } from "react";
import { useLocation, useNavigate } from "react-router";
import { decidedBy } from "~/lib/marking/criterion-order";
import { isToScoreFor } from "~/lib/marking/desk-filters";
import { counted } from "~/lib/plural";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
import type { DeskGroup } from "~/server/marking/marking-desk.server";
import { BulkBar } from "./bulk-bar";
import { HandInCard, type CardDesk } from "./hand-in-card";
import { markSaves, rowView } from "./mark-saves";

export type DeskProps = {
  desk: CardDesk;
  rows: MarkingDeskRow[];
  /** The band of each row, by position. */
  bands: string[];
  groups: DeskGroup[];
  /** Every student passing the filters, on all pages, in order. */
  matchingIds: string[];
  /** Those of them still to score on this criterion as the page was loaded, in the same order. */
  toMarkIds: string[];
  /** The card to focus as the page loads (where the "next to score" key led). */
  openId: string | null;
};

export function MarkingDesk({ desk, rows, bands, groups, matchingIds, toMarkIds, openId }: DeskProps) {
  const { criterion, canEdit } = desk;
  const [saves, dispatch] = useReducer(markSaves, {});
  const [selected, setSelected] = useState<ReadonlySet<string>>(new Set());
  const [nextNote, setNextNote] = useState("");
  const cardsRef = useRef<HTMLDivElement>(null);
  const focusCard = useCallback((index: number) => cardsRef.current?.querySelector<HTMLElement>(`[data-card="${index}"]`)?.focus(), []);

  // Another criterion is another pass over the class: the selection belonged to the last one.
  useEffect(() => setSelected(new Set()), [criterion.id]);
  useEffect(() => {
    const index = rows.findIndex((row) => row.membershipId === openId);
    if (index >= 0) focusCard(index);
  }, [openId, rows, focusCard]);

  const select = useCallback(
    (ids: readonly string[], on: boolean) =>
      setSelected((current) => {
        const next = new Set(current);
        for (const id of ids)
          if (on) next.add(id);
          else next.delete(id);
        return next;
      }),
    [],
  );
  const clear = useCallback(() => setSelected(new Set()), []);

  // Alt+N, from anywhere on the desk: the next card still to score on this criterion after the focused
  // one, in the desk's order, wrapping round. This page's cards are judged as saved since; others as loaded.
  const navigate = useNavigate();
  const location = useLocation();
  useEffect(() => {
    const onKeyDown = (event: KeyboardEvent) => {
      if (!event.altKey || event.ctrlKey || event.metaKey || event.code !== "KeyN") return;
      event.preventDefault();
      const focused = (document.activeElement as HTMLElement | null)?.closest<HTMLElement>("[data-card]");
      const current = focused?.dataset.membership;
      const onPage = new Map(rows.map((row) => [row.membershipId, row]));
      const waiting = new Set(toMarkIds);
      const stillToScore = (id: string) => {
        const base = onPage.get(id);
        return base ? isToScoreFor(rowView(saves[id], base).row, criterion.id) : waiting.has(id);
      };
      const from = current ? matchingIds.indexOf(current) : -1;
      const next = [...matchingIds.slice(from + 1), ...matchingIds.slice(0, Math.max(from, 0))].find(stillToScore);
      if (!next) {
        setNextNote(`No other hand-in shown is waiting for “${criterion.title}”.`);
        return;
      }
      setNextNote("");
      const index = rows.findIndex((row) => row.membershipId === next);
      if (index >= 0) focusCard(index);
      else {
        const params = new URLSearchParams(location.search);
        params.delete("page");
        params.set("student", next);
        navigate(`?${params}`, { preventScrollReset: true });
      }
    };
    document.addEventListener("keydown", onKeyDown);
    return () => document.removeEventListener("keydown", onKeyDown);
  }, [rows, saves, toMarkIds, matchingIds, criterion, location.search, navigate, focusCard]);

  const onMove = useCallback(
    (from: number, step: -1 | 1) => {
      if (rows[from + step]) focusCard(from + step);
    },
    [rows, focusCard],
  );

  const groupOf = new Map(groups.map((group) => [group.key, group]));
  const sections: { group: DeskGroup; start: number; end: number }[] = [];
  bands.forEach((band, index) => {
    const last = sections.at(-1);
    if (last && last.group.key === band) last.end = index + 1;
    else sections.push({ group: groupOf.get(band) ?? { key: band, title: band, membershipIds: [] }, start: index, end: index + 1 });
  });
  const selectedIds = matchingIds.filter((id) => selected.has(id));

  return (
    <div className="flex min-w-0 flex-col gap-3">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 className="text-lg font-semibold break-words">
          {criterion.title}
          <span className="ml-2 text-sm font-normal text-ink-700">
            up to {counted(criterion.maxPoints, "point", "points")} · ordered by {decidedBy(criterion)}
          </span>
        </h2>
        {canEdit && matchingIds.length > 0 ? (
          <button type="button" className="text-sm underline" onClick={() => select(matchingIds, selectedIds.length < matchingIds.length)}>
            {selectedIds.length < matchingIds.length
              ? `Select every hand-in shown (${matchingIds.length})`
              : `Clear the selection (${matchingIds.length})`}
          </button>
        ) : null}
      </div>
      {criterion.description ? <p className="text-sm text-ink-700">{criterion.description}</p> : null}
      {canEdit ? <BulkBar key={criterion.id} rubric={desk.rubric} criterion={criterion} selectedIds={selectedIds} clear={clear} /> : null}
      <div ref={cardsRef} className="flex flex-col gap-5" aria-describedby="desk-keys">
        {rows.length === 0 ? <p className="rounded-lg bg-white p-6 text-center text-ink-700">No hand-in matches these choices.</p> : null}
        {sections.map(({ group, start, end }) => {
          const inGroup = group.membershipIds;
          const allIn = inGroup.length > 0 && inGroup.every((id) => selected.has(id));
          return (
            <section key={`${group.key}-${start}`} aria-labelledby={`band-${group.key}`} className="flex flex-col gap-2">
              <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1 border-b border-ink-900/15 pb-1">
                <h3 id={`band-${group.key}`} className="font-semibold">
                  {group.title}
                </h3>
                <span className="text-sm text-ink-700">{counted(inGroup.length, "hand-in", "hand-ins")}</span>
                {canEdit && inGroup.length > 0 ? (
                  <button type="button" className="text-sm underline" onClick={() => select(inGroup, !allIn)}>
                    {allIn ? "Unselect this group" : `Select all ${counted(inGroup.length, "card", "cards")} in this group`}
                  </button>
                ) : null}
              </div>
              <div className="grid grid-cols-[repeat(auto-fill,minmax(min(100%,17rem),1fr))] gap-2">
                {rows.slice(start, end).map((row, offset) => (
                  <HandInCard
                    key={row.membershipId}
                    desk={desk}
                    base={row}
                    saves={saves[row.membershipId]}
                    dispatch={dispatch}
                    index={start + offset}
                    selected={selected.has(row.membershipId)}
                    onSelect={(on) => select([row.membershipId], on)}
                    onMove={onMove}
                  />
                ))}
              </div>
            </section>
          );
        })}
      </div>
      <p id="desk-keys" className="text-xs text-ink-700">
        Keys on a card:{" "}
        {criterion.kind === "auto"
          ? "automatic points are overridden on the card, with a reason"
          : criterion.kind === "levels"
            ? "a level's number scores it, 0 or Delete clears it"
            : "a number gives those points, Delete clears them"}
        ; arrows or j and k move between cards; Space selects the card; Alt+N, from anywhere on the desk, goes to the next card still to
        score.
      </p>
      <p role="status" className="text-sm">
        {nextNote}
      </p>
    </div>
  );
}
