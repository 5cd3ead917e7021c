/**
 * The criterion-first marking desk: one criterion across the class, the hand-ins as cards in that
 * criterion's order and bands. Arrow keys or j/k move between cards, a number key on a card scores it,
 * Space or its box selects it, a band's button selects the whole band (on every page), and one change
 * then goes to the selection in one transaction. Alt+N goes to the next card still to score. Each card
 * saves itself as the marker works (see `mark-saves`).
 */
import { useCallback, useEffect, useMemo, useReducer, useRef, useState } from "react";
import { useLocation, useNavigate } from "react-router";
import { decidedBy } from "~/lib/marking/criterion-order";
import { cardRow, type DeskCard, type DeskCardRow } from "~/lib/marking/desk-card";
import { isToScoreFor } from "~/lib/marking/desk-filters";
import { counted } from "~/lib/plural";
import { BulkBar, type BulkTarget } from "./bulk-bar";
import { HandInCard, LevelLegend, type CardDesk } from "./hand-in-card";
import { markSaves, rowView } from "./mark-saves";

/** A band of the order as the page knows it: its size on every page, not its members. */
export type DeskBand = { key: string; title: string; count: number };

export type DeskProps = {
  desk: CardDesk;
  cards: DeskCard[];
  /** The band of each card, by position. */
  bands: string[];
  groups: DeskBand[];
  /** Hand-ins passing the filters, on every page. */
  totalRows: number;
  /** The desk's filters, which a bulk action names instead of every student's id. */
  filters: { cohortId: string | null; status: string | null };
  /** The card to focus as the page loads (where the "next to score" key led). */
  openId: string | null;
  /** The "next to score" key asked the server, and no other hand-in shown is waiting. */
  noneToScore: boolean;
  /** More than one page: the next card to score may lie on another, which the server finds. */
  paged: boolean;
};

/** The selection as the page holds it: the whole filter, whole bands, cards one by one (with their band), and cards taken out. */
type Selection = { all: boolean; bands: ReadonlySet<string>; picked: ReadonlyMap<string, string>; except: ReadonlyMap<string, string> };
const nothingSelected: Selection = { all: false, bands: new Set(), picked: new Map(), except: new Map() };

const withoutBand = (entries: ReadonlyMap<string, string>, band: string) => new Map([...entries].filter(([, of]) => of !== band));
const coversBand = (selection: Selection, band: string) => selection.all || selection.bands.has(band);
const isSelected = (selection: Selection, id: string, band: string) =>
  (coversBand(selection, band) || selection.picked.has(id)) && !selection.except.has(id);

function selectCard(selection: Selection, id: string, band: string, on: boolean): Selection {
  const picked = new Map(selection.picked);
  const except = new Map(selection.except);
  if (on) except.delete(id);
  else picked.delete(id);
  if (on && !coversBand(selection, band)) picked.set(id, band);
  if (!on && coversBand(selection, band)) except.set(id, band);
  return { ...selection, picked, except };
}

function selectBand(selection: Selection, band: string, on: boolean, groups: readonly DeskBand[]): Selection {
  const picked = withoutBand(selection.picked, band);
  const except = withoutBand(selection.except, band);
  if (on) return { ...selection, bands: new Set([...selection.bands, band]), picked, except };
  // "Everything but this band" is every other band.
  const bands = selection.all ? groups.map((group) => group.key) : [...selection.bands];
  return { all: false, bands: new Set(bands.filter((key) => key !== band)), picked, except };
}

export function MarkingDesk({ desk, cards, bands, groups, totalRows, filters, openId, noneToScore, paged }: DeskProps) {
  const { criterion, canEdit, rubric } = desk;
  const rows = useMemo(() => cards.map((card) => cardRow(rubric, card)), [cards, rubric]);
  const [saves, dispatch] = useReducer(markSaves<DeskCardRow>, {});
  const [selection, setSelection] = useState<Selection>(nothingSelected);
  const [nextNote, setNextNote] = useState("");
  const cardsRef = useRef<HTMLDivElement>(null);
  const focusCard = useCallback((index: number) => cardsRef.current?.querySelector<HTMLElement>(`[data-card="${index}"]`)?.focus(), []);

  // Another criterion or other filters are another pass over the class: the selection belonged to the last one.
  useEffect(() => setSelection(nothingSelected), [criterion.id, filters.cohortId, filters.status]);
  useEffect(() => {
    const index = rows.findIndex((row) => row.membershipId === openId);
    if (index >= 0) focusCard(index);
  }, [openId, rows, focusCard]);
  useEffect(
    () => setNextNote(noneToScore ? `No other hand-in shown is waiting for “${criterion.title}”.` : ""),
    [noneToScore, criterion.title],
  );

  const clear = useCallback(() => setSelection(nothingSelected), []);
  const bandCount = new Map(groups.map((group) => [group.key, group.count]));
  const selectedCount = selection.all
    ? totalRows - selection.except.size
    : [...selection.bands].reduce((sum, band) => sum + (bandCount.get(band) ?? 0), 0) + selection.picked.size - selection.except.size;
  const target: BulkTarget = {
    criterionId: criterion.id,
    cohortId: filters.cohortId,
    status: filters.status,
    all: selection.all,
    bands: [...selection.bands],
    ids: [...selection.picked.keys()],
    except: [...selection.except.keys()],
    count: selectedCount,
  };

  // Alt+N, from anywhere on the desk: the next card still to score on this criterion after the focused
  // one, in the desk's order, wrapping round. This page's cards are judged as saved since; when none
  // after the focused one waits and there are other pages, the server finds the next (`?after=`).
  const navigate = useNavigate();
  const location = useLocation();
  const cardView = useCallback((card: DeskCardRow) => rowView<DeskCardRow>(saves[card.membershipId], card).row, [saves]);
  useEffect(() => {
    const onKeyDown = (event: KeyboardEvent) => {
      if (!event.altKey || event.ctrlKey || event.metaKey || event.code !== "KeyN") return;
      event.preventDefault();
      const focused = (document.activeElement as HTMLElement | null)?.closest<HTMLElement>("[data-card]");
      const from = focused ? Number(focused.dataset.card) : -1;
      const stillToScore = (index: number) => index !== from && isToScoreFor(cardView(rows[index]), criterion.id);
      const indices = [...rows.keys()];
      const later = indices.slice(from + 1).find(stillToScore);
      const next = later ?? (paged ? undefined : indices.find(stillToScore));
      if (next !== undefined) {
        setNextNote("");
        focusCard(next);
      } else if (paged && rows.length > 0) {
        const params = new URLSearchParams(location.search);
        params.delete("page");
        params.set("after", rows[from >= 0 ? from : rows.length - 1].membershipId);
        navigate(`?${params}`, { preventScrollReset: true });
      } else setNextNote(`No other hand-in shown is waiting for “${criterion.title}”.`);
    };
    document.addEventListener("keydown", onKeyDown);
    return () => document.removeEventListener("keydown", onKeyDown);
  }, [rows, cardView, criterion, paged, location.search, navigate, focusCard]);

  const onMove = useCallback(
    (from: number, step: -1 | 1) => {
      if (rows[from + step]) focusCard(from + step);
    },
    [rows, focusCard],
  );

  const groupOf = new Map(groups.map((group) => [group.key, group]));
  const sections: { group: DeskBand; start: number; end: number }[] = [];
  bands.forEach((band, index) => {
    const last = sections.at(-1);
    if (last && last.group.key === band) last.end = index + 1;
    else sections.push({ group: groupOf.get(band) ?? { key: band, title: band, count: 0 }, start: index, end: index + 1 });
  });
  const everything = selectedCount >= totalRows;

  return (
    <div className="flex min-w-0 flex-col gap-3">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 className="text-lg font-semibold break-words">
          {criterion.title}
          <span className="ml-2 text-sm font-normal text-ink-700">
            up to {counted(criterion.maxPoints, "point", "points")} · ordered by {decidedBy(criterion)}
          </span>
        </h2>
        {canEdit && totalRows > 0 ? (
          <button
            type="button"
            className="text-sm underline"
            onClick={() => setSelection(everything ? nothingSelected : { ...nothingSelected, all: true })}
          >
            {everything ? `Clear the selection (${totalRows})` : `Select every hand-in shown (${totalRows})`}
          </button>
        ) : null}
      </div>
      {criterion.description ? <p className="text-sm text-ink-700">{criterion.description}</p> : null}
      <LevelLegend criterion={criterion} />
      {canEdit ? <BulkBar key={criterion.id} rubric={desk.rubric} criterion={criterion} target={target} clear={clear} /> : null}
      <div ref={cardsRef} className="flex flex-col gap-5" aria-describedby="desk-keys">
        {rows.length === 0 ? <p className="rounded-lg bg-white p-6 text-center text-ink-700">No hand-in matches these choices.</p> : null}
        {sections.map(({ group, start, end }) => {
          const allIn = coversBand(selection, group.key) && ![...selection.except.values()].includes(group.key);
          return (
            <section key={`${group.key}-${start}`} aria-labelledby={`band-${group.key}`} className="flex flex-col gap-2">
              <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1 border-b border-ink-900/15 pb-1">
                <h3 id={`band-${group.key}`} className="font-semibold">
                  {group.title}
                </h3>
                <span className="text-sm text-ink-700">{counted(group.count, "hand-in", "hand-ins")}</span>
                {canEdit && group.count > 0 ? (
                  <button
                    type="button"
                    className="text-sm underline"
                    onClick={() => setSelection(selectBand(selection, group.key, !allIn, groups))}
                  >
                    {allIn ? "Unselect this group" : `Select all ${counted(group.count, "card", "cards")} in this group`}
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
                    selected={isSelected(selection, row.membershipId, group.key)}
                    onSelect={(on) => setSelection((current) => selectCard(current, row.membershipId, group.key, on))}
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
