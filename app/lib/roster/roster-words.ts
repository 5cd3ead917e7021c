/** The roster import's sentences with counts, agreeing with their numbers (see `plural.ts`). */
import { counted, plural } from "../plural";

/** The commit button: what confirming the preview does. */
export function rosterCommitLabel(invited: number, updated: number): string {
  if (updated === 0)
    return `Import ${counted(invited, "person", "people")} and send ${plural(invited, "the invitation", "their invitations")}`;
  if (invited === 0) return `Update ${counted(updated, "person", "people")}`;
  return `Import ${counted(invited + updated, "person", "people")}: send ${counted(invited, "invitation", "invitations")} and update ${updated}`;
}

export type RosterImported = { invited: number; students: number; tas: number; updated: number; unchanged: number };

/** What an import did, after it committed. */
export function rosterImportedSentence(result: RosterImported): string {
  const parts = [
    result.invited
      ? `${counted(result.invited, "invitation", "invitations")} sent (${counted(result.students, "student", "students")}, ${counted(result.tas, "TA", "TAs")})`
      : null,
    result.updated ? `${counted(result.updated, "person", "people")} updated` : null,
    result.unchanged ? `${result.unchanged} unchanged` : null,
  ];
  return `Imported: ${parts.filter(Boolean).join("; ") || "nothing to change"}.`;
}
