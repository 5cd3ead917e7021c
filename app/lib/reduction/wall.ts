import { ReductionInputError } from "./errors";

export type WallCorrectionMethod = "faxen" | "haberman-sayre" | "francis" | "none";

export interface WallModelRange {
  /** Largest diameter ratio λ = d/D for which the model is usually trusted. */
  maxDiameterRatio: number;
  source: string;
}

/**
 * Usual ranges of validity of the wall factors, all derived or fitted for creeping flow (Re ≪ 1) of a
 * sphere on the axis of a long circular cylinder.
 */
export const WALL_MODEL_RANGES: Record<Exclude<WallCorrectionMethod, "none">, WallModelRange> = {
  // A reflection series in λ: the truncated terms grow quickly, and it is commonly trusted to λ ≈ 0.3
  // (Happel & Brenner 1965, Low Reynolds Number Hydrodynamics, §7-4 — from memory).
  faxen: { maxDiameterRatio: 0.3, source: "Faxén (1922) series; Happel & Brenner (1965) §7-4" },
  // Haberman & Sayre (1958), David Taylor Model Basin Report 1143: creeping-flow solution, to λ ≈ 0.8.
  "haberman-sayre": { maxDiameterRatio: 0.8, source: "Haberman & Sayre (1958), DTMB Report 1143" },
  // Francis (1933), Physics 4, 403: fitted to falling-sphere experiments, stated for λ < 0.97.
  francis: { maxDiameterRatio: 0.97, source: "Francis (1933), Physics 4, 403–406" },
};

/**
 * Velocity ratio K(λ) = v/v∞ of a sphere settling on the axis of a cylinder, λ = d/D:
 *
 * - Faxén: K = 1 − 2.104λ + 2.09λ³ − 0.95λ⁵
 * - Haberman–Sayre (1958): K = (1 − 2.1050λ + 2.0865λ³ − 1.7068λ⁵ + 0.72603λ⁶) / (1 − 0.75857λ⁵).
 *   Their published factor (1 − 0.75857λ⁵)/(1 − 2.1050λ + …) multiplies the Stokes drag, F = 3πμdv·f,
 *   so the velocity ratio is its reciprocal; its leading term 1 − 2.105λ matches Faxén's.
 * - Francis (1933): K = ((1 − λ)/(1 − 0.475λ))⁴
 * - none: K = 1
 *
 * λ must lie in [0, 1): at λ ≥ 1 the sphere does not fit in the column.
 */
export function wallFactor(diameterRatio: number, method: WallCorrectionMethod): number {
  if (!(diameterRatio >= 0 && diameterRatio < 1)) {
    throw new ReductionInputError([
      { path: "diameterRatio", message: "d/D must be at least 0 and below 1 (the sphere must fit in the column)" },
    ]);
  }
  const λ = diameterRatio;
  switch (method) {
    case "faxen": {
      const λ2 = λ * λ;
      return 1 - 2.104 * λ + 2.09 * λ2 * λ - 0.95 * λ2 * λ2 * λ;
    }
    case "haberman-sayre": {
      const λ3 = λ * λ * λ;
      const λ5 = λ3 * λ * λ;
      return (1 - 2.105 * λ + 2.0865 * λ3 - 1.7068 * λ5 + 0.72603 * λ5 * λ) / (1 - 0.75857 * λ5);
    }
    case "francis": {
      const ratio = (1 - λ) / (1 - 0.475 * λ);
      const squared = ratio * ratio;
      return squared * squared;
    }
    case "none":
      return 1;
  }
}
