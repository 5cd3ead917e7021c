/**
 * Benchpost's words for where a student's hand-in of a lab stands, one place for the marking desk, the
 * lab dashboard, the course overview and the e-mails. Each state has a short word, a sentence for
 * readers who want it spelt out, and a shape (drawn by `StateMark`) so that no state is told by colour
 * alone. A hand-in can be in several states at once: one about its timing, one about its scoring, and
 * possibly flagged by the class comparison. Pure.
 */
import type { HandInStanding } from "~/lib/drop-logs/hand-in-window";
import type { MarkProgress } from "~/lib/marking/marks";

export const handInStates = ["awaited", "absent", "after-due", "to-score", "part-scored", "scored", "relogged", "flagged"] as const;
export type HandInState = (typeof handInStates)[number];

/** The three families the states fall into; the desk's legend groups its filters by them. */
export const stateFamilies = {
  timing: ["awaited", "absent", "after-due"],
  scoring: ["to-score", "part-scored", "scored", "relogged"],
  comparison: ["flagged"],
} as const satisfies Record<string, readonly HandInState[]>;
export const stateFamilyTitles: Record<keyof typeof stateFamilies, string> = {
  timing: "Timing",
  scoring: "Scoring",
  comparison: "Class comparison",
};

/**
 * The shapes are ours: an open ring with gaps (still to come), a ring crossed out (nothing came), a
 * clock hand (came after the due time), an empty, half-filled and filled disc for the scoring, a
 * looping arrow (came again) and a diamond (stands apart from the class).
 */
export type StateShape = "gapped-ring" | "crossed-ring" | "clock" | "disc-empty" | "disc-half" | "disc-full" | "loop" | "diamond";

export const stateWords: Record<HandInState, { word: string; sentence: string; shape: StateShape }> = {
  awaited: { word: "Awaited", sentence: "Nothing handed in yet; their due time is still ahead.", shape: "gapped-ring" },
  absent: { word: "No drop log", sentence: "Nothing was handed in by their due time.", shape: "crossed-ring" },
  "after-due": { word: "After due", sentence: "Handed in after their due time.", shape: "clock" },
  "to-score": { word: "To score", sentence: "Handed in; no criterion scored yet.", shape: "disc-empty" },
  "part-scored": { word: "Part-scored", sentence: "Handed in; some criteria still to score.", shape: "disc-half" },
  scored: { word: "Scored", sentence: "Every criterion has its points.", shape: "disc-full" },
  relogged: { word: "Re-logged", sentence: "Handed in again after it was scored: score the newer version.", shape: "loop" },
  flagged: { word: "Stands apart", sentence: "Suspect or outlier in the class comparison.", shape: "diamond" },
};

/** The timing state of a hand-in standing, or null when it was handed in on time (nothing to point out). */
export function timingState(standing: HandInStanding): HandInState | null {
  if (standing === "not-due") return "awaited";
  if (standing === "missing") return "absent";
  if (standing === "late") return "after-due";
  return null;
}

/** The timing of a hand-in in one word, "On time" included (the marks exports name every student's). */
export function standingWord(standing: HandInStanding): string {
  const state = timingState(standing);
  return state ? stateWords[state].word : "On time";
}

/** What a desk row tells about a student's hand-in. */
export type StateEvidence = {
  status: HandInStanding;
  handIn: unknown;
  progress: MarkProgress;
  flagged: boolean;
  handInChangedSinceMarked: boolean;
  needsRemarking: boolean;
};

/** Every state a student's hand-in is in, timing first, then scoring, then the class comparison. */
export function handInStatesOf(row: StateEvidence): HandInState[] {
  const states: HandInState[] = [];
  const timing = timingState(row.status);
  if (timing) states.push(timing);
  if (row.handIn !== null) {
    if (row.needsRemarking || (row.handInChangedSinceMarked && row.progress !== "unmarked")) states.push("relogged");
    else states.push(row.progress === "unmarked" ? "to-score" : row.progress === "partial" ? "part-scored" : "scored");
  }
  if (row.flagged) states.push("flagged");
  return states;
}
