/**
 * The checks of a falling-sphere reduction (product brief, "Checks that produce warnings, not silent
 * numbers"), as one list: each check's code and level, when it applies, and its message, built only
 * when it applies (messages format numbers). Pure: no I/O.
 */
import { DRAG_MODEL_RANGES } from "./drag";
import { ReductionInputError } from "./errors";
import type {
  DragKeyResults,
  FallingSphereInput,
  ReductionCheck,
  ReductionCheckCode,
  ReductionUncertainty,
  ViscometryKeyResults,
} from "./falling-sphere";
import type { DropSets, Kinematics, RunIn } from "./falling-sphere-kinematics";
import { format, formatPercent } from "./format";
import { RUN_IN_VELOCITY_FRACTION } from "./run-in";
import {
  CREEPING_FLOW_WALL_TOLERANCE,
  DI_FELICE_MAX_REYNOLDS,
  diFeliceWallFactor,
  inertialWallShift,
  WALL_MODEL_RANGES,
  wallFactor,
  type AppliedWallCorrection,
  type WallCorrection,
} from "./wall";
import { counted } from "../plural";

/** The wall slowing a sphere by more than this is worth saying when no correction was chosen (our threshold). */
const NEGLIGIBLE_WALL_EFFECT = 0.01;
/**
 * Near-neutral buoyancy: Δρ = ρs − ρf known to worse than 10 % (|Δρ| < 10 u(Δρ)) is warned about, as it
 * then dominates the result's uncertainty (our threshold); under 2 u(Δρ), about 95 % coverage for a
 * normal distribution (GUM G.1.3), its sign is not known and the reduction is refused.
 */
const NEAR_NEUTRAL_BUOYANCY_RATIO = 10;
const UNKNOWN_SIGN_COVERAGE_FACTOR = 2;
/** How the engine's messages name each wall factor. */
const WALL_FACTOR_NAMES: Record<AppliedWallCorrection, string> = {
  faxen: "Faxén's series",
  "haberman-sayre": "Haberman–Sayre's factor",
  francis: "Francis' factor",
  "di-felice": "Di Felice's factor",
  none: "no correction",
};

/** Refuses a sphere whose Δρ is within twice its standard uncertainty: whether it sinks or rises is unknown. */
export function refuseUnknownBuoyancy(kinematics: Kinematics, uDensityExcess: number): void {
  if (kinematics.densityExcess >= UNKNOWN_SIGN_COVERAGE_FACTOR * uDensityExcess) return;
  throw new ReductionInputError([
    {
      path: "sphere",
      message: `ρs − ρf = ${format(kinematics.sphereDensity - kinematics.fluidDensity)} kg/m³ is within twice its standard uncertainty (2u = ${format(2 * uDensityExcess)} kg/m³, about 95 % coverage): whether the sphere sinks or rises cannot be told. Weigh it more finely, or use a sphere much denser or lighter than the fluid`,
    },
  ]);
}

/** What the checks read of one reduction. */
export interface CheckFacts {
  input: FallingSphereInput;
  kinematics: Kinematics;
  drops: DropSets;
  wall: WallCorrection;
  main: DragKeyResults | ViscometryKeyResults;
  runIn: RunIn;
  uncertainty: ReductionUncertainty;
  uDensityExcess: number;
  /** See {@link neglectedWallOf}. */
  neglectedWall: { estimate: AppliedWallCorrection; factor: number; beyondCreepingFlow: boolean } | null;
}

interface CheckRule {
  code: ReductionCheckCode;
  level: ReductionCheck["level"];
  applies(facts: CheckFacts): boolean;
  message(facts: CheckFacts): string;
}

/** The too-few-drops warning, in words that agree with the count. */
export function tooFewDropsMessage(timed: number, required: number): string {
  return `${counted(timed, "drop", "drops")} timed; the lab asks for at least ${required}.`;
}

/** The checks in the order a reduction lists them; the stray-drop test's own finding comes third. */
const CHECKS: readonly CheckRule[] = [
  {
    code: "too-few-drops",
    level: "warn",
    applies: ({ input }) => input.drops.length < requiredDrops(input),
    message: ({ input }) => tooFewDropsMessage(input.drops.length, requiredDrops(input)),
  },
  {
    code: "single-drop",
    level: "warn",
    applies: ({ input }) => input.drops.length === 1,
    message: () => "A single drop gives no scatter: no standard deviation, interval or Type A uncertainty.",
  },
  {
    code: "sphere-lighter-than-fluid",
    level: "error",
    applies: ({ kinematics }) => kinematics.sphereDensity < kinematics.fluidDensity,
    message: ({ kinematics }) =>
      `The sphere (ρs = ${format(kinematics.sphereDensity)} kg/m³) is lighter than the fluid (ρf = ${format(kinematics.fluidDensity)} kg/m³): it would rise, not fall. The figures use |ρs − ρf| and hold only for a sphere timed rising; check the sphere's mass and diameter.`,
  },
  {
    code: "sphere-density-disagrees-with-kit",
    level: "warn",
    applies: (facts) =>
      facts.kinematics.sphereDensitySource === "mass" &&
      facts.input.sphere.density !== undefined &&
      Math.abs(kitDisagreement(facts)) > kitTolerance(facts),
    message: (facts) =>
      `The measured mass and diameter give ρs = ${format(facts.kinematics.sphereDensity)} kg/m³, ${formatPercent(kitDisagreement(facts))} from the kit's ${format(facts.input.sphere.density as number)} kg/m³ (more than ${formatPercent(kitTolerance(facts), false)}).`,
  },
  {
    code: "near-neutral-buoyancy",
    level: "warn",
    applies: ({ kinematics, uDensityExcess }) => kinematics.densityExcess < NEAR_NEUTRAL_BUOYANCY_RATIO * uDensityExcess,
    message: ({ kinematics, uDensityExcess }) =>
      `Near-neutral buoyancy: ρs − ρf = ${format(kinematics.sphereDensity - kinematics.fluidDensity)} kg/m³ with a standard uncertainty of ${format(uDensityExcess)} kg/m³ (${formatPercent(uDensityExcess / kinematics.densityExcess, false)}), which then dominates the uncertainty of every result; a small change of the fluid's temperature shifts it too.`,
  },
  {
    code: "run-in-unknown",
    level: "info",
    applies: ({ input }) => input.column.runIn === undefined,
    message: (facts) =>
      `No run-in distance given; the sphere needs about ${format(facts.runIn.runInNeeded)} m of fall from release to reach ${RUN_IN_VELOCITY_FRACTION * 100} % of its terminal velocity (${runInBasis(facts)}).`,
  },
  {
    code: "run-in-too-short",
    level: "warn",
    applies: ({ input, runIn }) => input.column.runIn !== undefined && input.column.runIn < runIn.runInNeeded,
    message: (facts) =>
      `The run-in (${format(facts.input.column.runIn as number)} m) is shorter than the ${format(facts.runIn.runInNeeded)} m the sphere needs to reach ${RUN_IN_VELOCITY_FRACTION * 100} % of its terminal velocity (${runInBasis(facts)}): it may still be speeding up in the timed distance.`,
  },
  {
    code: "margin-below-too-short",
    level: "warn",
    applies: ({ input: { column } }) =>
      column.marginBelow !== undefined && column.innerDiameter !== undefined && column.marginBelow < column.innerDiameter / 2,
    message: ({ input: { column } }) =>
      `The lower band is ${format(column.marginBelow as number)} m above the bottom, less than one column radius (${format((column.innerDiameter as number) / 2)} m): the bottom already slows the sphere before it reaches the band (end effect; Tanner 1963, J. Fluid Mech. 17, 161–170).`,
  },
  {
    code: "wall-correction-not-applied",
    level: "info",
    applies: ({ kinematics }) => kinematics.wallMethod !== "none" && kinematics.diameterRatio === null,
    message: () => "No column inner diameter given: no wall correction was applied (K = 1).",
  },
  // The wall factor's checks: how much the wall slows the sphere when no correction was chosen, which
  // factor was applied when it is not the lab's choice, and loudly (an error) a d/D no model covers.
  // Such a hand-in is still reduced, with the nearest model extrapolated: the times are measured data
  // the student must be able to hand in, and staff see the error on it, where a refusal would hide it.
  {
    code: "wall-effect-neglected",
    level: "warn",
    applies: ({ neglectedWall }) => neglectedWall !== null && 1 - neglectedWall.factor > NEGLIGIBLE_WALL_EFFECT,
    message: (facts) => {
      const { estimate, factor } = facts.neglectedWall as NonNullable<CheckFacts["neglectedWall"]>;
      return `No wall correction was chosen, but at d/D = ${format(diameterRatioOf(facts))} the wall slows the sphere to about K = ${format(factor)} of its unbounded velocity (${WALL_FACTOR_NAMES[estimate]}): the results are computed from a velocity ${formatPercent(1 - factor, false)} below v∞.`;
    },
  },
  {
    code: "wall-factor-outside-creeping-flow",
    level: "warn",
    applies: (facts) => correctedBeyondCreepingFlow(facts),
    message: (facts) => {
      const { wall } = facts;
      const chosen = chosenWallMethod(facts);
      const diameterRatio = diameterRatioOf(facts);
      const creepingValue =
        diameterRatio <= WALL_MODEL_RANGES[chosen].maxDiameterRatio
          ? `; ${WALL_FACTOR_NAMES[chosen]} would give K = ${format(wallFactor(diameterRatio, chosen))}`
          : "";
      return `Re = ${format(wall.reynolds)} is beyond the creeping flow ${WALL_FACTOR_NAMES[chosen]} assumes: at d/D = ${format(diameterRatio)} inertia weakens the wall effect by more than ${formatPercent(CREEPING_FLOW_WALL_TOLERANCE, false)} in K, so Di Felice's (1996) factor for finite Re was used, K = ${format(wall.factor)}${creepingValue}.`;
    },
  },
  {
    code: "reynolds-outside-wall-model",
    level: "warn",
    applies: (facts) => correctedBeyondCreepingFlow(facts) && facts.wall.reynolds > DI_FELICE_MAX_REYNOLDS,
    message: ({ wall }) =>
      `Re = ${format(wall.reynolds)} is above the range Di Felice's wall factor was fitted to (Re ≤ ${DI_FELICE_MAX_REYNOLDS}; ${WALL_MODEL_RANGES["di-felice"].source}): K = ${format(wall.factor)} is extrapolated.`,
  },
  {
    code: "wall-correction-substituted",
    level: "warn",
    applies: ({ kinematics, wall }) =>
      kinematics.diameterRatio !== null &&
      kinematics.wallMethod !== "none" &&
      wall.applied !== "di-felice" &&
      wall.applied !== kinematics.wallMethod,
    message: (facts) => {
      const { wall } = facts;
      const chosen = chosenWallMethod(facts);
      const diameterRatio = diameterRatioOf(facts);
      const range = WALL_MODEL_RANGES[chosen];
      return `d/D = ${format(diameterRatio)} is beyond the range of ${WALL_FACTOR_NAMES[chosen]} (d/D ≤ ${range.maxDiameterRatio}; ${range.source}), which would give K = ${format(wallFactor(diameterRatio, chosen))}: ${WALL_FACTOR_NAMES[wall.applied]} (to d/D ≤ ${WALL_MODEL_RANGES[wall.applied as Exclude<AppliedWallCorrection, "none">].maxDiameterRatio}) was used instead, K = ${format(wall.factor)}.`;
    },
  },
  {
    code: "diameter-ratio-outside-wall-model",
    level: "error",
    applies: (facts) => facts.kinematics.diameterRatio !== null && facts.kinematics.diameterRatio > widestWallModel(facts).maxDiameterRatio,
    message: (facts) => {
      const widest = widestWallModel(facts);
      const factor = facts.neglectedWall?.factor ?? facts.wall.factor;
      return `d/D = ${format(diameterRatioOf(facts))} is beyond every wall factor's range (${beyondCreepingFlow(facts) ? "beyond creeping flow, Di Felice's" : "in creeping flow, Francis'"} reaches d/D ≤ ${widest.maxDiameterRatio}; ${widest.source})${facts.kinematics.wallMethod === "none" ? "" : `: K = ${format(factor)} is extrapolated`}, and the results are not reliable. Use a smaller sphere or a wider column.`;
    },
  },
  {
    code: "reynolds-outside-drag-model-range",
    level: "warn",
    // Past the most accurate range the reference already drifts by several per cent: a warning too, as the brief asks.
    applies: ({ kinematics, main }) => kinematics.mode === "drag" && main.reynolds > DRAG_MODEL_RANGES[kinematics.dragModel].infoAbove,
    message: ({ kinematics: { dragModel }, main: { reynolds } }) => {
      const range = DRAG_MODEL_RANGES[dragModel];
      return `Re = ${format(reynolds)} is above the ${reynolds > range.warnAbove ? "range" : "most accurate range"} of the ${dragModel} drag law (Re ≤ ${reynolds > range.warnAbove ? range.warnAbove : range.infoAbove}; ${range.source}).`;
    },
  },
  {
    code: "reynolds-too-large-for-stokes",
    level: "warn",
    applies: ({ kinematics, main }) => kinematics.mode === "viscometry" && main.reynolds > 0.1,
    message: ({ main }) =>
      `Re = ${format(main.reynolds)}: Stokes' law underestimates the drag by about 3Re/16 = ${formatPercent((3 * main.reynolds) / 16, false)} (Oseen), so the Stokes viscosity is high; compare the Oseen-corrected value.`,
  },
  {
    code: "oseen-correction-not-applicable",
    level: "warn",
    applies: ({ kinematics, main }) => kinematics.mode === "viscometry" && (main as ViscometryKeyResults).viscosityOseen === null,
    message: ({ main }) =>
      `Re = ${format(main.reynolds)} ≥ 16/3: the Oseen correction would give a viscosity ≤ 0; this is no longer a creeping flow.`,
  },
  {
    code: "fluid-temperature-unknown",
    level: "info",
    applies: ({ input }) => input.fluid.temperature === undefined,
    message: () => "No fluid temperature given: the viscosity cannot be matched to the drop temperature.",
  },
];

/** Where the stray-drop test's finding goes in the list: after the drop counts, as the results read. */
const STRAY_DROP_FINDING_AT = 2;

/**
 * With no correction chosen and a column: the wall effect the reduction neglects, as the nearest factor
 * estimates it at the measured velocity's Re, and whether that flow is beyond creeping flow.
 */
export function neglectedWallOf(kinematics: Kinematics, measuredVelocity: number): CheckFacts["neglectedWall"] {
  const diameterRatio = kinematics.diameterRatio;
  if (diameterRatio === null || kinematics.wallMethod !== "none") return null;
  const reynolds = kinematics.reynoldsScale * (kinematics.reynoldsPower === 1 ? measuredVelocity : measuredVelocity * measuredVelocity);
  const beyondCreepingFlow = inertialWallShift(diameterRatio, reynolds) > CREEPING_FLOW_WALL_TOLERANCE;
  const estimate: AppliedWallCorrection = beyondCreepingFlow
    ? "di-felice"
    : diameterRatio <= WALL_MODEL_RANGES["haberman-sayre"].maxDiameterRatio
      ? "haberman-sayre"
      : "francis";
  const factor = estimate === "di-felice" ? diFeliceWallFactor(diameterRatio, reynolds) : wallFactor(diameterRatio, estimate);
  return { estimate, factor, beyondCreepingFlow };
}

export function reductionChecks(facts: CheckFacts): ReductionCheck[] {
  const checks: ReductionCheck[] = [];
  for (let i = 0; i < CHECKS.length; i++) {
    if (i === STRAY_DROP_FINDING_AT && facts.drops.strayTest.check) checks.push(facts.drops.strayTest.check);
    const rule = CHECKS[i];
    if (rule.applies(facts)) checks.push({ code: rule.code, level: rule.level, message: rule.message(facts) });
  }
  return checks;
}

function requiredDrops(input: FallingSphereInput): number {
  return input.requiredDrops ?? 5;
}

function kitDisagreement({ kinematics, input }: CheckFacts): number {
  return kinematics.sphereDensity / (input.sphere.density as number) - 1;
}

/** Our threshold: three combined standard uncertainties of ρs from m and d, but never below 1 %. */
function kitTolerance({ uncertainty }: CheckFacts): number {
  return Math.max(0.01, 3 * uncertainty.sphereDensity);
}

/** How the run-in was estimated, for a check's message. */
function runInBasis({ runIn, main }: CheckFacts): string {
  return main.reynolds <= 0.1
    ? `${format(runIn.runInNeeded / runIn.relaxationLength)} relaxation lengths, with τ = (ρs + ½ρf) d²/(18μ) = ${format(runIn.relaxationTime)} s`
    : `the approach with added mass and the standard drag curve at Re = ${format(main.reynolds)}`;
}

function diameterRatioOf({ kinematics }: CheckFacts): number {
  return kinematics.diameterRatio as number;
}

function chosenWallMethod({ kinematics }: CheckFacts): Exclude<Kinematics["wallMethod"], "none"> {
  return kinematics.wallMethod as Exclude<Kinematics["wallMethod"], "none">;
}

/** A correction was chosen and, beyond creeping flow, Di Felice's factor stood in for it. */
function correctedBeyondCreepingFlow({ kinematics, wall }: CheckFacts): boolean {
  return kinematics.diameterRatio !== null && kinematics.wallMethod !== "none" && wall.applied === "di-felice";
}

/** Beyond the creeping flow the wall factors assume: the applied factor's flow, or the estimate's when none was applied. */
function beyondCreepingFlow({ neglectedWall, wall }: CheckFacts): boolean {
  return neglectedWall ? neglectedWall.beyondCreepingFlow : wall.applied === "di-felice";
}

function widestWallModel(facts: CheckFacts) {
  return beyondCreepingFlow(facts) ? WALL_MODEL_RANGES["di-felice"] : WALL_MODEL_RANGES.francis;
}
