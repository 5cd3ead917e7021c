/**
 * What a release does to each student, decided in one place for the moderation page's counts and for
 * the release itself: the instructor chooses the fully marked students only, or every marked one, and
 * separately whether students who handed in nothing get a zero. A student who may still hand in (their
 * own cut-off, extensions counted, is in the future) never gets a zero. Pure.
 */
import { z } from "zod";
import type { MarkContent, MarkScores } from "./marks";
import type { RubricCriterion } from "./rubric";

/** What a hand-in from a student whose mark is released does: refused (the default), or taken with the mark reopened for re-marking. */
export const afterReleaseHandInPolicies = ["refuse", "reopen"] as const;
export type AfterReleaseHandIns = (typeof afterReleaseHandInPolicies)[number];
export const afterReleaseHandInNames: Record<AfterReleaseHandIns, string> = {
  refuse: "Refuse them: the student is told their mark is released",
  reopen: "Take them, and reopen the student's mark as needing re-marking",
};

export const releaseScopes = ["marked", "all"] as const;
export type ReleaseScope = (typeof releaseScopes)[number];

export type ReleaseChoice = {
  /** `marked`: only students whose every criterion has points, on their counted version; `all`: every mark given so far. */
  scope: ReleaseScope;
  /** Students whose hand-in window has closed with nothing handed in get a released zero (or the mark a marker gave them). */
  zeroForNoHandIn: boolean;
  /** The instructor saw that some students may still hand in, and releases anyway. */
  whileOpen: boolean;
};

/** The release form's choice, as the server checks it. */
export const releaseChoice = z.object({
  scope: z.enum(releaseScopes, { error: "Choose whom to release: the fully marked students, or every marked one." }),
  zeroForNoHandIn: z.preprocess((value) => value === true || value === "on" || value === "true", z.boolean()),
  whileOpen: z.preprocess((value) => value === true || value === "on" || value === "true", z.boolean()),
});

/** Where a student stands before a release. */
export type ReleaseStanding =
  | "released"
  | "fully-marked"
  | "partly-marked"
  /** Marked, but on an earlier version than the one now counted (handed in again since). */
  | "marked-on-earlier-version"
  /** Handed in, no mark yet: never released. */
  | "not-marked"
  /** Nothing handed in and their window has closed. */
  | "no-hand-in"
  /** Nothing handed in yet, and they still may. */
  | "no-hand-in-still-open";

export const releaseStandings: readonly ReleaseStanding[] = [
  "released",
  "fully-marked",
  "partly-marked",
  "marked-on-earlier-version",
  "not-marked",
  "no-hand-in",
  "no-hand-in-still-open",
];

export type ReleaseCounts = Record<ReleaseStanding, number>;

export function releaseStanding(student: {
  handedIn: boolean;
  stillOpen: boolean;
  mark: { released: boolean; complete: boolean; onCountedVersion: boolean } | null;
}): ReleaseStanding {
  const { mark } = student;
  if (mark?.released) return "released";
  if (!student.handedIn) return student.stillOpen ? "no-hand-in-still-open" : "no-hand-in";
  if (!mark) return "not-marked";
  if (!mark.onCountedVersion) return "marked-on-earlier-version";
  return mark.complete ? "fully-marked" : "partly-marked";
}

/** What the choice releases for a student of `standing`: their mark as it stands, a zero written for them, or nothing. */
export function releaseAction(
  standing: ReleaseStanding,
  hasMark: boolean,
  choice: Pick<ReleaseChoice, "scope" | "zeroForNoHandIn">,
): "mark" | "zero" | null {
  switch (standing) {
    case "fully-marked":
      return "mark";
    case "partly-marked":
    case "marked-on-earlier-version":
      return choice.scope === "all" ? "mark" : null;
    case "no-hand-in":
      return choice.zeroForNoHandIn ? (hasMark ? "mark" : "zero") : null;
    default:
      return null;
  }
}

/** How many students a choice releases, from the counts alone (the page shows it beside each choice). */
export function releasedCount(counts: ReleaseCounts, choice: Pick<ReleaseChoice, "scope" | "zeroForNoHandIn">): number {
  return (
    counts["fully-marked"] +
    (choice.scope === "all" ? counts["partly-marked"] + counts["marked-on-earlier-version"] : 0) +
    (choice.zeroForNoHandIn ? counts["no-hand-in"] : 0)
  );
}

export const emptyReleaseCounts = (): ReleaseCounts =>
  Object.fromEntries(releaseStandings.map((standing) => [standing, 0])) as ReleaseCounts;

/**
 * The mark a student who handed in nothing is released with when the instructor chooses so: no points
 * on any criterion (a levels criterion at its zero-point level when it has one), the automatic ones
 * written in as release writes them.
 */
export function zeroMark(rubric: readonly RubricCriterion[]): MarkContent {
  const scores: MarkScores = {};
  for (const criterion of rubric) {
    const zeroLevel = criterion.kind === "levels" ? (criterion.levels ?? []).findIndex((level) => level.points === 0) : -1;
    scores[criterion.id] =
      criterion.kind === "auto" ? { points: 0, frozen: true } : zeroLevel >= 0 ? { points: 0, level: zeroLevel + 1 } : { points: 0 };
  }
  return { scores, feedback: "Nothing was handed in for this lab.", latePenaltyPoints: 0 };
}
