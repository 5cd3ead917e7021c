/** The address import's sentences with counts, agreeing with their numbers. */
import { counted } from "../plural";

export type AddressCounts = { new: number; changed: number; unchanged: number; error: number };

export function addressPreviewHeading(rows: number, counts: AddressCounts): string {
  return `Preview: ${counted(rows, "row", "rows")} — ${counts.new} new, ${counts.changed} changed, ${counts.unchanged} unchanged, ${counts.error} with problems`;
}

export function addressesImportedSentence(done: { written: number; unchanged: number; skipped: number }): string {
  return `Imported: ${counted(done.written, "address", "addresses")} written, ${done.unchanged} unchanged, ${counted(done.skipped, "row", "rows")} with problems left out.`;
}
