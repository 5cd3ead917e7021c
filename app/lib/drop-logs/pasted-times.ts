/**
 * A column of drop times arriving at once (pasted, or read from a CSV file) and how it joins the times
 * already in the log. When the log already holds drops the student chooses: the column replaces them,
 * or it is added after them. Neither happens silently.
 */

/** Times pasted from a spreadsheet column or a stopwatch app's lap list: one per line, tab or semicolon. */
export function splitPastedTimes(text: string): string[] {
  return text
    .split(/[\r\n\t;]+/)
    .map((cell) => cell.trim().replace(/\s*s$/i, ""))
    .filter((cell) => cell !== "");
}

export type TimesJoin = "replace" | "append";

/** The times typed so far, without the blank rows the table keeps for typing into. */
export function enteredTimes(drops: string[]): string[] {
  return drops.filter((value) => value.trim() !== "");
}

/** The log's rows after the column joins it; blank rows go, so the column follows the last typed time. */
export function joinTimes(drops: string[], column: string[], how: TimesJoin): string[] {
  return how === "replace" ? [...column] : [...enteredTimes(drops), ...column];
}
