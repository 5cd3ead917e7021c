/** Moderation and release sentences with counts, agreeing with their numbers (see `plural.ts`). */
import { counted, plural } from "../plural";

export type ReleaseOutcome = { released: number; zeros: number; emailed: number; withheld: number };

/** After a release: what was released and e-mailed, and who still sees nothing. */
export function releasedSentence({ released, zeros, emailed, withheld }: ReleaseOutcome): string {
  const zeroWords = zeros ? ` (${zeros} of them zero for no hand-in)` : "";
  const withheldWords = withheld ? `; ${counted(withheld, "student sees", "students see")} nothing yet` : "";
  return `Released ${counted(released, "mark", "marks")}${zeroWords} and queued ${counted(emailed, "e-mail", "e-mails")}${withheldWords}.`;
}

/** Students whose hand-in window (extensions counted) is still open. */
export function stillOpenWords(students: number): string {
  return `${counted(students, "student", "students")} may still hand in (extensions counted)`;
}

/** The release button once a choice is made. */
export function releaseButtonLabel(marks: number): string {
  return `Release ${counted(marks, "mark", "marks")} and e-mail ${plural(marks, "the student", "their students")}`;
}

/** Marks changed after their release, beside "N marks released". */
export function changedSinceWords(changed: number): string {
  return `${changed} changed since, shown to ${plural(changed, "the student", "their students")} with the reason`;
}

/** Released marks that a later hand-in reopened. */
export function reopenedWords(reopened: number): string {
  return `${reopened} reopened by a hand-in after the release: mark ${plural(reopened, "it", "them")} again at the desk`;
}
