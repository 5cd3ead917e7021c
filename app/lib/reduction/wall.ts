import { ReductionInputError } from "./errors";

/** The wall corrections a lab can choose: all creeping-flow results, or none. */
export type WallCorrectionMethod = "faxen" | "haberman-sayre" | "francis" | "none";
type CreepingFlowMethod = Exclude<WallCorrectionMethod, "none">;
/** The factor a reduction actually applied: the lab's choice, a creeping-flow stand-in, or Di Felice's. */
export type AppliedWallCorrection = WallCorrectionMethod | "di-felice";

export interface WallModelRange {
  /** Largest diameter ratio λ = d/D for which the model is usually trusted. */
  maxDiameterRatio: number;
  source: string;
}

/**
 * Usual ranges of validity of the wall factors of a sphere on the axis of a long circular cylinder.
 * The first three are creeping-flow results (Re ≪ 1); Di Felice's carries the Reynolds number.
 */
export const WALL_MODEL_RANGES: Record<Exclude<AppliedWallCorrection, "none">, WallModelRange> = {
  // A reflection series in λ: the truncated terms grow quickly, and it is commonly trusted to λ ≈ 0.3
  // (Happel & Brenner 1965, Low Reynolds Number Hydrodynamics, §7-4 — from memory).
  faxen: { maxDiameterRatio: 0.3, source: "Faxén (1922) series; Happel & Brenner (1965) §7-4" },
  // Haberman & Sayre (1958), David Taylor Model Basin Report 1143: creeping-flow solution, to λ ≈ 0.8.
  "haberman-sayre": { maxDiameterRatio: 0.8, source: "Haberman & Sayre (1958), DTMB Report 1143" },
  // Francis (1933), Physics 4, 403: fitted to falling-sphere experiments, stated for λ < 0.97.
  francis: { maxDiameterRatio: 0.97, source: "Francis (1933), Physics 4, 403–406" },
  // Di Felice (1996), Int. J. Multiphase Flow 22, 527–533: fitted for about 0.08 ≤ λ ≤ 0.7 and
  // 0.01 ≤ Re ≤ 200 (both ranges from memory). Below λ = 0.08 it is used all the same: it tends to
  // K = 1 as λ → 0, as every wall factor does, so extrapolating towards a thin sphere is safe.
  "di-felice": { maxDiameterRatio: 0.7, source: "Di Felice (1996), Int. J. Multiphase Flow 22, 527–533" },
};

/** Di Felice's fit was made up to this Reynolds number (from memory, see {@link WALL_MODEL_RANGES}). */
export const DI_FELICE_MAX_REYNOLDS = 200;

/**
 * How far a creeping-flow wall factor may be from the one inertia gives: 1 % in K (our threshold, about
 * a hand timing's uncertainty). Common practice puts creeping flow below Re ≈ 0.1–1, but for the wall
 * effect no single Re fits every d/D: by Di Felice's own Re-dependence, inertia changes K by
 * |ln((1 − λ)/(1 − 0.33λ))|·(3.3 − α) = |ln(…)|·0.245 Re/(1 + 0.1 Re) in ln K, which reaches 1 % at
 * Re ≈ 0.27 for d/D = 0.2 but only at Re ≈ 1.3 for d/D = 0.05, where the wall matters less. So the
 * creeping-flow range used is where that shift stays within 1 %: Re up to about 0.6 at d/D = 0.1, 0.27
 * at 0.2, 0.16 at 0.3 (see {@link inertialWallShift}). Far beyond it the difference is gross: at
 * Re ≈ 168 Faxén's K = 0.60 at d/D = 0.2 is Di Felice's 0.86, and would halve C_D/C_D,ref.
 */
export const CREEPING_FLOW_WALL_TOLERANCE = 0.01;

/**
 * |ln K(λ, Re) − ln K(λ, 0)| by Di Felice (1996): how much inertia weakens the wall effect at Re. A
 * creeping-flow factor is used while it is within {@link CREEPING_FLOW_WALL_TOLERANCE}.
 */
export function inertialWallShift(diameterRatio: number, reynolds: number): number {
  return (-diFeliceLogBase(diameterRatio) * 0.245 * reynolds) / (1 + 0.1 * reynolds);
}

/** Creeping-flow stand-ins, tried in this order when the chosen factor's λ range is exceeded. */
const WIDER_CREEPING_FLOW_METHODS: readonly CreepingFlowMethod[] = ["haberman-sayre", "francis"];

const DI_FELICE_MAX_ITERATIONS = 100;
const DI_FELICE_TOLERANCE = 1e-12;

/**
 * Velocity ratio K(λ) = v/v∞ of a sphere settling on the axis of a cylinder in creeping flow, λ = d/D:
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
  checkDiameterRatio(diameterRatio);
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

/**
 * Di Felice (1996): K = ((1 − λ)/(1 − 0.33λ))^α with (3.3 − α)/(α − 0.85) = 0.1 Re∞, that is
 * α = (3.3 + 0.085 Re∞)/(1 + 0.1 Re∞), Re∞ based on the unbounded terminal velocity v∞ = v/K. α runs
 * from 3.3 in creeping flow (K ≈ 1 − 2.21λ, near Faxén's 1 − 2.10λ) down to 0.85 at high Re.
 */
export function diFeliceWallFactor(diameterRatio: number, reynolds: number): number {
  checkDiameterRatio(diameterRatio);
  return Math.exp(diFeliceExponent(reynolds) * diFeliceLogBase(diameterRatio));
}

function diFeliceExponent(reynolds: number): number {
  return (3.3 + 0.085 * reynolds) / (1 + 0.1 * reynolds);
}

function diFeliceLogBase(diameterRatio: number): number {
  return Math.log((1 - diameterRatio) / (1 - 0.33 * diameterRatio));
}

/** The wall factor a reduction applied, and where it came from. */
export interface WallCorrection {
  /** K = v/v∞. */
  factor: number;
  applied: AppliedWallCorrection;
  /**
   * Re∞ = reynoldsScale·v∞^reynoldsPower, the Reynolds number of the corrected velocity the factor
   * was chosen at (and, for Di Felice's, solved with).
   */
  reynolds: number;
  /** Di Felice only: fixed-point iterations to convergence; 0 otherwise. */
  iterations: number;
  /** ∂ln K/∂ln λ at fixed Re∞. */
  byDiameterRatio: number;
  /** ∂ln K/∂ln Re∞ at fixed λ: 0 for a creeping-flow factor. */
  byReynolds: number;
}

/**
 * Chooses and applies the wall factor for a sphere measured at `measuredVelocity` with d/D = λ. The
 * Reynolds number of the corrected velocity is Re∞ = reynoldsScale·v∞^reynoldsPower: power 1 in drag
 * mode (ρf d/μ · v∞), power 2 in viscometry, where μ is itself the Stokes result (18ρf/(Δρ g d) · v∞²).
 *
 * The design, as an instructor would expect it: the lab's chosen factor is used wherever it is valid,
 * and where it is not, the published factor that does cover the case is used instead, and the
 * reduction says so (`applied` differs from `method`). A student who timed a large sphere or a fast one
 * then gets the best available correction, named, rather than a creeping-flow factor that is off by a
 * factor of two, or a refusal for data that were properly taken.
 *
 * - Creeping flow, where inertia changes K by at most {@link CREEPING_FLOW_WALL_TOLERANCE} at the Re∞ the
 *   creeping-flow factor gives: the chosen factor if λ is within its range, else Haberman–Sayre (to
 *   0.8), else Francis (to 0.97, and beyond it, extrapolated; the caller warns).
 * - Above: Di Felice (1996), solved by fixed-point iteration, since its Re∞ depends on the corrected
 *   velocity it gives. Each step maps K to K(λ, Re∞(v/K)), whose slope |d ln K/d ln Re∞|·power is at
 *   most 0.61·|ln((1 − λ)/(1 − 0.33λ))|·power: below 0.6 for λ ≤ 0.7 in drag mode, so it contracts
 *   fast; the step is relaxed where the slope is large (viscometry, where Re∞ ∝ v∞², at a large λ).
 *   A run that does not settle to 10⁻¹² in 100 steps is refused.
 * - `none` applies K = 1 whatever the regime (the caller says how much that neglects).
 */
export function resolveWallCorrection(
  diameterRatio: number,
  method: WallCorrectionMethod,
  measuredVelocity: number,
  reynoldsScale: number,
  reynoldsPower: 1 | 2,
): WallCorrection {
  if (method === "none") {
    return {
      factor: 1,
      applied: "none",
      reynolds: reynoldsAt(1, measuredVelocity, reynoldsScale, reynoldsPower),
      iterations: 0,
      byDiameterRatio: 0,
      byReynolds: 0,
    };
  }
  let creeping: CreepingFlowMethod = method;
  if (diameterRatio > WALL_MODEL_RANGES[method].maxDiameterRatio) {
    creeping = WIDER_CREEPING_FLOW_METHODS.find((wider) => diameterRatio <= WALL_MODEL_RANGES[wider].maxDiameterRatio) ?? "francis";
  }
  const creepingFactor = wallFactor(diameterRatio, creeping);
  const creepingReynolds = reynoldsAt(creepingFactor, measuredVelocity, reynoldsScale, reynoldsPower);
  if (inertialWallShift(diameterRatio, creepingReynolds) <= CREEPING_FLOW_WALL_TOLERANCE) {
    return {
      factor: creepingFactor,
      applied: creeping,
      reynolds: creepingReynolds,
      iterations: 0,
      byDiameterRatio: diameterRatio > 0 ? creepingFlowElasticity(creeping, diameterRatio) : 0,
      byReynolds: 0,
    };
  }

  const logBase = diFeliceLogBase(diameterRatio);
  let factor = creepingFactor;
  for (let iteration = 1; iteration <= DI_FELICE_MAX_ITERATIONS; iteration++) {
    const reynolds = reynoldsAt(factor, measuredVelocity, reynoldsScale, reynoldsPower);
    const next = Math.exp(diFeliceExponent(reynolds) * logBase);
    const shrink = 1 + 0.1 * reynolds;
    // ∂ln K/∂ln Re∞ at this Re∞: ln K = α ln((1 − λ)/(1 − 0.33λ)), dα/dRe = (0.085 − 0.33)/(1 + 0.1Re)².
    const byReynolds = (logBase * -0.245 * reynolds) / (shrink * shrink);
    if (Math.abs(next - factor) <= DI_FELICE_TOLERANCE * factor) {
      return {
        factor: next,
        applied: "di-felice",
        reynolds: reynoldsAt(next, measuredVelocity, reynoldsScale, reynoldsPower),
        iterations: iteration,
        byDiameterRatio: diFeliceExponent(reynolds) * diameterRatio * (0.33 / (1 - 0.33 * diameterRatio) - 1 / (1 - diameterRatio)),
        byReynolds,
      };
    }
    // The map K → K(λ, Re∞(v/K)) falls with K (slope −power·byReynolds·next/K ≤ 0), so the relaxed
    // step K + ω(next − K) with ω = 1/(1 − slope) (Newton's step on K − next(K) = 0) is a damping in
    // (0, 1]: near 1 where the plain iteration contracts well (drag mode, λ ≤ 0.7: ω ≥ 0.6), smaller
    // where the plain iteration would oscillate or diverge.
    const slope = (-reynoldsPower * byReynolds * next) / factor;
    factor += (next - factor) / (1 - slope);
  }
  throw new ReductionInputError([
    {
      path: "wallCorrection",
      message: `Di Felice's wall factor did not settle at d/D = ${Number(diameterRatio.toPrecision(3))} (Re ≈ ${Number(creepingReynolds.toPrecision(3))}): no wall model covers this sphere in this column; use a smaller sphere or a wider column`,
    },
  ]);
}

/** Re∞ of the velocity corrected by `factor`; a module function, not a closure, as it runs per drop log. */
function reynoldsAt(factor: number, measuredVelocity: number, reynoldsScale: number, reynoldsPower: 1 | 2): number {
  const corrected = measuredVelocity / factor;
  return reynoldsPower === 1 ? reynoldsScale * corrected : reynoldsScale * corrected * corrected;
}

/** d ln K/d ln λ of a creeping-flow factor by a central difference in ln λ, step 10⁻⁶ (λ > 0). */
function creepingFlowElasticity(method: CreepingFlowMethod, diameterRatio: number): number {
  return (
    Math.log(wallFactor(diameterRatio * (1 + ELASTICITY_STEP), method) / wallFactor(diameterRatio * (1 - ELASTICITY_STEP), method)) /
    LOG_STEP_WIDTH
  );
}

const ELASTICITY_STEP = 1e-6;
const LOG_STEP_WIDTH = Math.log((1 + ELASTICITY_STEP) / (1 - ELASTICITY_STEP));

function checkDiameterRatio(diameterRatio: number): void {
  if (!(diameterRatio >= 0 && diameterRatio < 1)) {
    throw new ReductionInputError([
      { path: "diameterRatio", message: "d/D must be at least 0 and below 1 (the sphere must fit in the column)" },
    ]);
  }
}
