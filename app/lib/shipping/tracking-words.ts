/** The tracking import's outcome in words, agreeing with its numbers. */
import { counted, plural } from "../plural";
import type { TrackingDirection } from "./tracking-rows";

export type TrackingImported = { direction: TrackingDirection; moved: number; corrected: number; unchanged: number };

export function trackingImportedSentence({ direction, moved, corrected, unchanged }: TrackingImported): string {
  const kits = counted(moved, "kit", "kits");
  const movedWords =
    direction === "outbound"
      ? `${kits} in transit (${plural(moved, "its student is", "their students are")} e-mailed)`
      : `${kits} coming back`;
  return `Imported: ${movedWords}, ${counted(corrected, "parcel", "parcels")} corrected, ${unchanged} already up to date.`;
}
