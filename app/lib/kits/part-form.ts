/**
 * The part forms beyond `partInput`: what they show first and the part page's two forms. Numbers are
 * shown as text, as typed; calibration points come as rows of two boxes, with spare empty rows (left
 * out when sent empty).
 */
import { z } from "zod";
import { partInput } from "~/lib/kits/part-input";

export type CalibrationRow = { temperatureC: string; viscosityPaS: string };

export const blankCalibrationRows = (count: number): CalibrationRow[] =>
  Array.from({ length: count }, () => ({ temperatureC: "", viscosityPaS: "" }));

type StoredPart = Record<string, unknown> & { calibration?: { temperatureC: number; viscosityPaS: number }[] | null };

/** A stored part as its re-measure form's first values, with `spareRows` empty calibration rows after its points. */
export function storedPartValues(part: StoredPart, spareRows: number): Record<string, string | CalibrationRow[]> {
  const values = Object.fromEntries(
    Object.entries(part).map(([field, value]) => [field, value === null || typeof value === "object" ? "" : String(value)]),
  );
  const points = (part.calibration ?? []).map((point) => ({
    temperatureC: String(point.temperatureC),
    viscosityPaS: String(point.viscosityPaS),
  }));
  return { ...values, calibration: [...points, ...blankCalibrationRows(spareRows)] };
}

/** Why a part's status or measurements changed, kept in its history. */
const historyNote = z
  .string()
  .trim()
  .max(500, "Keep the note under 500 characters.")
  .optional()
  .transform((value) => value || null);

/** The part page's two forms, told apart by `intent`. */
export const partStatusChange = z.object({
  intent: z.literal("status"),
  status: z.enum(["in_service", "remeasure", "retired"]),
  note: historyNote,
});
export const partRemeasure = z.object({ intent: z.literal("remeasure"), note: historyNote }).and(partInput);
export type PartRemeasureInput = z.input<typeof partRemeasure>;
export type PartRemeasure = z.output<typeof partRemeasure>;
