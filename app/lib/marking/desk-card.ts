/**
 * A hand-in card of the marking desk as the page receives it: what the card draws and what its saves
 * need, nothing more, so that a desk page weighs the same whatever the class and its loader data is
 * not a second, larger copy of the HTML. The cells and totals are not sent: the page computes them
 * with the same pure rubric code as the server (`cardRow`). Pure.
 */
import type { HandInStanding, StudentDeadline } from "~/lib/drop-logs/hand-in-window";
import type { ClassComparisonLabel } from "~/lib/reduction";
import type { AutoSuggestion } from "./automatic-criteria";
import { markProgress, markTotals, type MarkProgress, type MarkScores, type MarkTotals } from "./marks";
import type { RubricCriterion } from "./rubric";

export type DeskCard = {
  membershipId: string;
  studentName: string;
  cohortName: string;
  /** The student's own deadline, only when an extension moved it (the card says so). */
  deadline: StudentDeadline | null;
  status: HandInStanding;
  handIn: {
    version: number;
    dropCount: number | null;
    strayDropCount: number | null;
    dropTimes: number[] | null;
    strayDrops: number[] | null;
    warningCount: number;
    kitNotAtHome: string | null;
    /** C_D/C_D,ref (drag) or μ/μ_ref (viscometry), with its expanded uncertainty; then the lab kind's own results. */
    figure: number | null;
    figureExpanded: number | null;
    dragCoefficient: number | null;
    reynolds: number | null;
    viscosityPaS: number | null;
  } | null;
  /** The version the mark rests on, when the counted hand-in is newer (null: marked before any hand-in). */
  markedVersion: number | null;
  classLabel: { label: ClassComparisonLabel; reason: string } | null;
  flagged: boolean;
  /** What a save computes from: the scores, the penalty, whether the student has seen it, and who last marked it. */
  mark: { scores: MarkScores; latePenaltyPoints: number; releasedAt: string | null; markedBy: { name: string } | null } | null;
  expectedVersion: number;
  /** The automatic criteria's suggestions; the reason only for the criterion being marked (the others add up, unseen). */
  suggestions: Record<string, AutoSuggestion>;
  handInChangedSinceMarked: boolean;
  needsRemarking: boolean;
  resultChangedSinceMarked: { oldFigure: number | null; newFigure: number | null } | null;
};

/** A card with its cells and totals, as the desk draws and saves it. */
export type DeskCardRow = DeskCard &
  Pick<MarkTotals, "cells" | "subtotal" | "total" | "maxTotal" | "complete"> & { progress: MarkProgress };

export function cardRow(rubric: readonly RubricCriterion[], card: DeskCard): DeskCardRow {
  const totals = markTotals(rubric, card.mark, card.suggestions);
  return {
    ...card,
    cells: totals.cells,
    subtotal: totals.subtotal,
    total: totals.total,
    maxTotal: totals.maxTotal,
    complete: totals.complete,
    progress: markProgress(card.mark !== null, totals),
  };
}
