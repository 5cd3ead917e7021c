export { classComparison, normalisedFigure } from "./class-comparison";
export type {
  ClassComparisonEntry,
  ClassComparisonLabel,
  ClassComparisonOptions,
  ClassComparisonResult,
  NormalisedFigureOptions,
} from "./class-comparison";
export { DRAG_MODEL_RANGES, referenceDragCoefficient } from "./drag";
export type { DragModel, DragModelRange } from "./drag";
export { ReductionInputError } from "./errors";
export type { ReductionIssue } from "./errors";
export { reduceFallingSphere } from "./falling-sphere";
export { DEFAULT_STANDARD_UNCERTAINTIES } from "./falling-sphere-uncertainty";
export type { StandardUncertainties } from "./falling-sphere-uncertainty";
export type {
  DragKeyResults,
  DragReduction,
  DropResults,
  FallingSphereInput,
  Reduction,
  ReductionCheck,
  ReductionCheckCode,
  ReductionMode,
  ReductionUncertainty,
  VelocityResults,
  ViscometryKeyResults,
  ViscometryReduction,
} from "./falling-sphere";
export { generalizedEsd } from "./generalized-esd";
export type { GeneralizedEsdOptions, GeneralizedEsdResult } from "./generalized-esd";
export { grubbsCriticalValue, grubbsIterative, grubbsIterativeSteps, grubbsTest } from "./grubbs";
export type {
  GrubbsIterativeOptions,
  GrubbsSides,
  GrubbsStep,
  GrubbsTestOptions,
  GrubbsTestResult,
  StudentizedDeviateStep,
} from "./grubbs";
export { describeDrops, studentTQuantile } from "./statistics";
export { DEFAULT_TIME_RESOLUTION_S, findStrayDrops, MINIMUM_DROPS_FOR_STRAY_TEST } from "./stray-drops";
export type { StrayDropFinding, StrayDropOptions } from "./stray-drops";
export type { DropStatistics } from "./statistics";
export { quantileType7, tukeyFences } from "./tukey";
export type { TukeyFences } from "./tukey";
export { calibrationUncertainty, fitFluidViscosity, viscosityAt, viscosityTemperatureCoefficient } from "./viscosity-model";
export type { FluidViscosityFit, ViscosityCalibrationPoint } from "./viscosity-model";
export { BudgetAccumulator, COVERAGE_PROBABILITY, fallingSphereBudget } from "./uncertainty-budget";
export type { UncertaintyBudget, UncertaintyBudgetRow, UncertaintyTotals } from "./uncertainty-budget";
export { relaxationTime, RUN_IN_VELOCITY_FRACTION, runInLength } from "./run-in";
export type { RunInContext } from "./run-in";
export {
  CREEPING_FLOW_WALL_TOLERANCE,
  DI_FELICE_MAX_REYNOLDS,
  diFeliceWallFactor,
  inertialWallShift,
  resolveWallCorrection,
  WALL_MODEL_RANGES,
  wallFactor,
} from "./wall";
export type { AppliedWallCorrection, WallCorrection, WallCorrectionMethod, WallModelRange } from "./wall";
