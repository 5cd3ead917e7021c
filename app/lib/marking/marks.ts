/**
 * A mark's scores and how they add up, and the one function that applies a change to a mark (a
 * criterion's level or points, the late penalty, the feedback). The server runs it for a single cell
 * and for a bulk action alike, so both check values the same way. Pure.
 */
import { AppError } from "~/lib/app-error";
import { z } from "zod";
import type { AutoSuggestion } from "./automatic-criteria";
import { MAX_CRITERION_POINTS, roundPoints, type RubricCriterion } from "./rubric";

/**
 * One criterion's score in a mark. Levels keep the level picked (1-based) beside its points; an
 * automatic criterion's score is an override (with its reason) or, after release, the suggestion
 * written in (`frozen`).
 */
export type MarkScore = { points: number; level?: number; overrideReason?: string; frozen?: true };
/** Scores by criterion id. */
export type MarkScores = Record<string, MarkScore>;

/** What a change may touch: the part of a mark kept in `mark_changes.old`/`new` (with the total and the version it was based on). */
export type MarkContent = { scores: MarkScores; feedback: string; latePenaltyPoints: number };
export type MarkState = MarkContent & { total: number; dropLogVersionId: string | null };

/** What the student saw at release. */
export type ReleasedMarkSnapshot = MarkState & { releasedAt: string };

/** Where a cell's points come from: given by hand, an override of a suggestion, the suggestion itself, the suggestion as released, or nothing yet. */
export type CellSource = "marked" | "override" | "suggestion" | "released" | "unmarked";

/** One criterion of one mark as the desk shows it. */
export type MarkCell = {
  /** The points that count; null when nothing is given and nothing can be suggested. */
  points: number | null;
  /** The level picked (levels criteria), 1-based. */
  level: number | null;
  source: CellSource;
  overrideReason: string | null;
  /** The automatic criterion's suggestion, also when it is overridden. */
  suggestion: AutoSuggestion | null;
};

export type MarkTotals = {
  cells: Record<string, MarkCell>;
  /** Sum of the cells' points, before the late penalty. */
  subtotal: number;
  /** Subtotal minus the late penalty, never below 0. */
  total: number;
  maxTotal: number;
  /** Every criterion has points. */
  complete: boolean;
};

/** Where a student's mark stands: nothing saved yet, saved but a criterion still without points, or every criterion scored. */
export type MarkProgress = "unmarked" | "partial" | "marked";

const levelPoints = (criterion: RubricCriterion, level: number | undefined) =>
  level !== undefined && criterion.levels && level >= 1 && level <= criterion.levels.length
    ? criterion.levels[level - 1].points
    : undefined;

/** One criterion's cell: a level's points are read from the rubric, so editing a level's points carries through to unreleased marks. */
export function markCell(criterion: RubricCriterion, score: MarkScore | undefined, suggestion: AutoSuggestion | null): MarkCell {
  if (criterion.kind === "auto") {
    if (score?.frozen) return { points: score.points, level: null, source: "released", overrideReason: null, suggestion };
    if (score) return { points: score.points, level: null, source: "override", overrideReason: score.overrideReason ?? null, suggestion };
    return {
      points: suggestion?.points ?? null,
      level: null,
      source: suggestion?.points === null || !suggestion ? "unmarked" : "suggestion",
      overrideReason: null,
      suggestion,
    };
  }
  if (!score) return { points: null, level: null, source: "unmarked", overrideReason: null, suggestion: null };
  const points = criterion.kind === "levels" ? (levelPoints(criterion, score.level) ?? score.points) : score.points;
  return { points, level: score.level ?? null, source: "marked", overrideReason: null, suggestion: null };
}

/** Every cell and the total: the sum of the criteria's points (given, overridden or suggested) minus the late penalty, floored at 0. */
export function markTotals(
  rubric: readonly RubricCriterion[],
  content: Pick<MarkContent, "scores" | "latePenaltyPoints"> | null,
  suggestions: Record<string, AutoSuggestion>,
): MarkTotals {
  const cells: Record<string, MarkCell> = {};
  let subtotal = 0;
  let maxTotal = 0;
  let complete = true;
  for (const criterion of rubric) {
    const cell = markCell(criterion, content?.scores[criterion.id], suggestions[criterion.id] ?? null);
    cells[criterion.id] = cell;
    maxTotal += criterion.maxPoints;
    if (cell.points === null) complete = false;
    else subtotal += cell.points;
  }
  subtotal = roundPoints(subtotal);
  return {
    cells,
    subtotal,
    total: Math.max(0, roundPoints(subtotal - (content?.latePenaltyPoints ?? 0))),
    maxTotal: roundPoints(maxTotal),
    complete,
  };
}

export const markProgress = (hasMark: boolean, totals: Pick<MarkTotals, "complete">): MarkProgress =>
  !hasMark ? "unmarked" : totals.complete ? "marked" : "partial";

/**
 * Release writes each automatic criterion's current suggestion into the scores (unless overridden), so
 * the released mark no longer moves with the class.
 */
export function freezeSuggestions(
  rubric: readonly RubricCriterion[],
  scores: MarkScores,
  suggestions: Record<string, AutoSuggestion>,
): MarkScores {
  const frozen: MarkScores = { ...scores };
  for (const criterion of rubric) {
    const points = suggestions[criterion.id]?.points;
    if (criterion.kind === "auto" && !frozen[criterion.id] && points !== null && points !== undefined)
      frozen[criterion.id] = { points, frozen: true };
  }
  return frozen;
}

/** The scores without the suggestions release wrote in: what was given by hand (and overrides). */
export function unfreezeSuggestions(scores: MarkScores): MarkScores {
  return Object.fromEntries(Object.entries(scores).filter(([, score]) => !score.frozen));
}

const reasonText = z.string().trim().max(500, "At most 500 characters.");

/**
 * A change to a mark, as the desk and the bulk action send it. `score` with neither `level` nor
 * `points` clears the criterion (an automatic one goes back to its suggestion).
 */
export const markChange = z.discriminatedUnion("kind", [
  z.object({
    kind: z.literal("score"),
    criterionId: z.uuid(),
    level: z.number().int().nullish(),
    points: z.number().finite().nullish(),
    /** Required when overriding an automatic criterion. */
    overrideReason: reasonText.nullish(),
  }),
  z.object({ kind: z.literal("latePenalty"), points: z.number({ error: "Enter the late penalty in points." }).finite() }),
  z.object({ kind: z.literal("feedback"), text: z.string().max(5000, "At most 5,000 characters.") }),
]);
export type MarkChange = z.infer<typeof markChange>;

/** A value the rubric refuses; `field` names the part of the change it is about. */
function refusedValue(message: string, field: "criterionId" | "level" | "points" | "overrideReason" | "text"): AppError {
  return new AppError({ code: "invalid_value", message, field });
}

const MIN_REASON_LENGTH = 3;

/**
 * The mark's content after `change`, or an `AppError` (code invalid_value). A released mark keeps a value for every
 * criterion it has one for: clearing is refused there, since the student has seen it.
 */
export function applyMarkChange(
  rubric: readonly RubricCriterion[],
  before: MarkContent | null,
  change: MarkChange,
  { released = false } = {},
): MarkContent {
  const content: MarkContent = before
    ? { scores: { ...before.scores }, feedback: before.feedback, latePenaltyPoints: before.latePenaltyPoints }
    : { scores: {}, feedback: "", latePenaltyPoints: 0 };
  if (change.kind === "feedback") {
    content.feedback = change.text.trim();
    return content;
  }
  if (change.kind === "latePenalty") {
    if (change.points < 0 || change.points > MAX_CRITERION_POINTS)
      throw refusedValue(`The late penalty is between 0 and ${MAX_CRITERION_POINTS} points.`, "points");
    content.latePenaltyPoints = roundPoints(change.points);
    return content;
  }
  const criterion = rubric.find((candidate) => candidate.id === change.criterionId);
  if (!criterion) throw refusedValue("This criterion is not in the lab's rubric.", "criterionId");
  const level = change.level ?? null;
  const points = change.points ?? null;
  if (level === null && points === null) {
    if (released && content.scores[criterion.id])
      throw refusedValue("This mark is released: give the criterion a value instead of clearing it.", "points");
    delete content.scores[criterion.id];
    return content;
  }
  if (criterion.kind === "levels") {
    const count = criterion.levels?.length ?? 0;
    if (level === null || level < 1 || level > count) throw refusedValue(`Pick a level from 1 to ${count}.`, "level");
    content.scores[criterion.id] = { points: criterion.levels![level - 1].points, level };
    return content;
  }
  if (level !== null) throw refusedValue(`“${criterion.title}” is scored in points, not levels.`, "level");
  const low = criterion.kind === "range" ? criterion.minPoints : 0;
  if (points! < low || points! > criterion.maxPoints)
    throw refusedValue(`Give between ${low} and ${criterion.maxPoints} points.`, "points");
  if (criterion.kind === "range") {
    content.scores[criterion.id] = { points: roundPoints(points!) };
    return content;
  }
  const overrideReason = change.overrideReason?.trim() ?? "";
  if (overrideReason.length < MIN_REASON_LENGTH) throw refusedValue("Say why the automatic suggestion is overridden.", "overrideReason");
  content.scores[criterion.id] = { points: roundPoints(points!), overrideReason };
  return content;
}

function canonical(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(canonical);
  if (value && typeof value === "object")
    return Object.fromEntries(
      Object.keys(value)
        .sort()
        .map((key) => [key, canonical((value as Record<string, unknown>)[key])]),
    );
  return value;
}

/** Whether two contents say the same (key order aside): a change to the same values is not recorded. */
export const sameContent = (a: MarkContent | null, b: MarkContent) =>
  a !== null &&
  JSON.stringify(canonical({ s: a.scores, f: a.feedback, l: a.latePenaltyPoints })) ===
    JSON.stringify(canonical({ s: b.scores, f: b.feedback, l: b.latePenaltyPoints }));
