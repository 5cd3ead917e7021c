/** The CSV imports' sentences with counts (parts, roster, tracking numbers), agreeing with their numbers. */
import { counted, plural } from "../plural";

/** The preview's heading: how many rows the file has, and how many of them have problems. */
export function previewHeading(rows: number, withProblems: number): string {
  return `Preview: ${counted(rows, "row", "rows")}, ${withProblems} with problems`;
}

/** Rows with problems that an import leaves out while it writes the others. */
export function leftOutSentence(withProblems: number): string {
  const them = plural(withProblems, "it", "them");
  return `${counted(withProblems, "row with problems is", "rows with problems are")} left out: fix ${them} in your file and import it again to add ${them}.`;
}

/** Under a preview cut short: which rows the table shows. */
export function shownRowsSentence(shown: number, total: number): string {
  return `The first ${shown} of ${counted(total, "row is", "rows are")} shown, those with problems first.`;
}

/** A commit that wrote nothing: rows that passed the preview fail against what is stored now. */
export function nothingImportedSentence(problems: number, whatChanged: string): string {
  return `Nothing was imported: ${counted(problems, "row has problems", "rows have problems")} (the ${whatChanged} changed since the preview?).`;
}

/** A file over the import's limit. */
export function tooManyRowsSentence(rows: number, limit: number): string {
  return `The file has ${counted(rows, "row", "rows")}; import at most ${limit} at a time.`;
}

/** The parts import's outcome, with the labels of the parts whose checks want a look. */
export function partsImportedSentence(created: number, warned: string[]): string {
  const imported = `${counted(created, "part", "parts")} imported.`;
  if (warned.length === 0) return imported;
  return `${imported} ${counted(warned.length, "of them raises checks", "of them raise checks")} (${warned.join(", ")}); open ${plural(warned.length, "it", "them")} to see why.`;
}
