/**
 * Automatic criteria: points suggested from the counted hand-in's reduction and the class comparison.
 * They are suggestions, computed whenever a mark is read (until release freezes them); a TA may
 * override one with a reason. Pure.
 */
import type { ClassComparisonLabel } from "~/lib/reduction";
import { roundPoints, type RubricCriterion } from "./rubric";
import { counted } from "../plural";

/** What the automatic rules read about one student's hand-in for the lab. */
export type HandInEvidence = {
  /** False when nothing is handed in: every automatic criterion then suggests 0. */
  handedIn: boolean;
  late: boolean;
  /** Drops in the counted version's reduction (stray drops included: nothing is dropped silently). */
  dropCount: number | null;
  /** The lab's required number of drops. */
  requiredDrops: number;
  /** C_D/C_D,ref (drag) or μ/μ_ref (viscometry); null when the hand-in cannot be compared. */
  figure: number | null;
  /** The live class-comparison label of the counted version; null when it has no figure. */
  classLabel: ClassComparisonLabel | null;
  classReason: string | null;
  /** The mark rests on a version that is no longer the counted one (handed in again since). */
  superseded?: boolean;
};

/** A suggested number of points, with the reason in words; `points` is null when the rule cannot decide (a TA must). */
export type AutoSuggestion = { points: number | null; reason: string };

const percent = (value: number) => `${(value * 100).toFixed(1)} %`;

/** The points one automatic criterion suggests for a hand-in. */
export function evaluateAutoCriterion(
  criterion: Pick<RubricCriterion, "autoRule" | "autoParams" | "maxPoints">,
  evidence: HandInEvidence,
): AutoSuggestion {
  const max = criterion.maxPoints;
  if (!evidence.handedIn) return { points: 0, reason: "Nothing handed in." };
  switch (criterion.autoRule) {
    case "required_drops": {
      if (evidence.dropCount === null) return { points: null, reason: "The hand-in's drop count is unknown." };
      return evidence.dropCount >= evidence.requiredDrops
        ? { points: max, reason: `${counted(evidence.dropCount, "drop", "drops")}, at least the ${evidence.requiredDrops} required.` }
        : { points: 0, reason: `${counted(evidence.dropCount, "drop", "drops")}, fewer than the ${evidence.requiredDrops} required.` };
    }
    case "within_reference": {
      if (evidence.figure === null) return { points: null, reason: "The hand-in has no normalised figure to compare with the reference." };
      const tolerance = (criterion.autoParams.tolerancePercent ?? 0) / 100;
      const off = Math.abs(evidence.figure - 1);
      const figure = evidence.figure.toFixed(3);
      // A hair's tolerance for binary rounding, so a figure of exactly 1.10 is within 10 %.
      return off <= tolerance + 1e-12
        ? { points: max, reason: `Normalised figure ${figure}: ${percent(off)} from the reference, within ±${percent(tolerance)}.` }
        : { points: 0, reason: `Normalised figure ${figure}: ${percent(off)} from the reference, beyond ±${percent(tolerance)}.` };
    }
    case "not_outlier": {
      if (evidence.superseded)
        return { points: null, reason: "The mark rests on an earlier version; the class comparison labels the latest one. Mark it again." };
      if (evidence.classLabel === null)
        return { points: null, reason: "The hand-in is not in the class comparison (no normalised figure)." };
      const why = evidence.classReason ? ` ${evidence.classReason}` : "";
      if (evidence.classLabel === "consistent") return { points: max, reason: `Consistent with the class.${why}` };
      if (evidence.classLabel === "suspect")
        return { points: roundPoints(criterion.autoParams.suspectPoints ?? max / 2), reason: `Suspect in the class comparison.${why}` };
      return { points: 0, reason: `Outlier in the class comparison.${why}` };
    }
    case "on_time": {
      if (!evidence.late) return { points: max, reason: "Handed in on time." };
      const penalty = criterion.autoParams.latePenaltyPoints ?? max;
      return { points: roundPoints(Math.max(0, max - penalty)), reason: `Handed in late: ${counted(penalty, "point", "points")} off.` };
    }
    default:
      return { points: null, reason: "Not an automatic criterion." };
  }
}

/** The suggestion of every automatic criterion of the rubric, by criterion id. */
export function suggestAutomaticCriteria(rubric: readonly RubricCriterion[], evidence: HandInEvidence): Record<string, AutoSuggestion> {
  const suggestions: Record<string, AutoSuggestion> = {};
  for (const criterion of rubric) if (criterion.kind === "auto") suggestions[criterion.id] = evaluateAutoCriterion(criterion, evidence);
  return suggestions;
}
