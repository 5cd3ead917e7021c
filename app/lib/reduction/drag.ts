export type DragModel = "stokes" | "oseen" | "schiller-naumann";

export interface DragModelRange {
  /** Above this Reynolds number the model starts to drift from the standard drag curve (info). */
  infoAbove: number;
  /** Above this Reynolds number the model should not be used (warning). */
  warnAbove: number;
  source: string;
}

/**
 * Reynolds ranges for the reference drag laws. Stokes' and Oseen's are set where the next-order term
 * they neglect reaches a few per cent; Schiller–Naumann's is its fitted range.
 */
export const DRAG_MODEL_RANGES: Record<DragModel, DragModelRange> = {
  // Oseen's correction 3Re/16 is the first neglected term: 1.9 % at Re = 0.1, 19 % at Re = 1.
  stokes: { infoAbove: 0.1, warnAbove: 1, source: "Stokes (1851); size of Oseen's 3Re/16 term" },
  // Oseen's law tracks the standard drag curve to within a few per cent up to Re ≈ 1 and fails by Re ≈ 5
  // (Clift, Grace & Weber 1978, ch. 5 — from memory).
  oseen: { infoAbove: 1, warnAbove: 5, source: "Oseen (1910); Clift, Grace & Weber (1978) ch. 5" },
  // Fitted to Re ≈ 800 (Schiller & Naumann 1933; Clift, Grace & Weber 1978, Table 5.2 notes).
  "schiller-naumann": { infoAbove: 800, warnAbove: 800, source: "Schiller & Naumann (1933)" },
};

/**
 * Reference drag coefficient of a smooth sphere at Reynolds number Re (based on diameter):
 *
 * - Stokes (1851): C_D = 24/Re
 * - Oseen (1910): C_D = 24/Re · (1 + 3Re/16)
 * - Schiller & Naumann (1933): C_D = 24/Re · (1 + 0.15 Re^0.687)
 */
export function referenceDragCoefficient(reynolds: number, model: DragModel): number {
  const stokes = 24 / reynolds;
  switch (model) {
    case "stokes":
      return stokes;
    case "oseen":
      return stokes * (1 + (3 * reynolds) / 16);
    case "schiller-naumann":
      return stokes * (1 + 0.15 * Math.pow(reynolds, 0.687));
  }
}

/** d ln C_D,ref / d ln Re, used to carry the uncertainty of Re into C_D/C_D,ref. */
export function referenceDragLogSlope(reynolds: number, model: DragModel): number {
  switch (model) {
    case "stokes":
      return -1;
    case "oseen": {
      const correction = (3 * reynolds) / 16;
      return -1 + correction / (1 + correction);
    }
    case "schiller-naumann": {
      const correction = 0.15 * Math.pow(reynolds, 0.687);
      return -1 + (0.687 * correction) / (1 + correction);
    }
  }
}
