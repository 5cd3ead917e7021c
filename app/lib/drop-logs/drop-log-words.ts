/** The drop log form's sentences with counts, agreeing with their numbers. */
import { counted, plural } from "../plural";

/** Asked when a column of times arrives (pasted or from a file) while the log has drops already. */
export function joinTimesQuestion(incoming: number, from: string, typed: number): string {
  const them = plural(incoming, "it", "them");
  return `${counted(incoming, "drop time", "drop times")} ${from}, and the log already has ${counted(typed, "drop", "drops")}. Add ${them} after the last drop, or replace the drops with ${them}?`;
}
