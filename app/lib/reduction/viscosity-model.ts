import { IssueList } from "./errors";

const KELVIN_OFFSET = 273.15;

export interface ViscosityCalibrationPoint {
  /** Temperature (°C). */
  temperature: number;
  /** Dynamic viscosity (Pa·s). */
  viscosity: number;
}

/**
 * A fluid lot's viscosity–temperature model. `andrade`: ln μ = A + B/T with T in kelvin (Andrade 1930,
 * Nature 125, 309), fitted by least squares on ln μ; `constant`: a single calibration point, μ = e^A
 * at every temperature (B = 0), which the `warning` says.
 */
export interface FluidViscosityFit {
  kind: "andrade" | "constant";
  /** A in ln(μ / Pa·s) = A + B/T. */
  a: number;
  /** B (K) in ln(μ / Pa·s) = A + B/T; 0 for a constant model. */
  b: number;
  pointCount: number;
  /** Calibrated range (°C); extrapolating beyond it is at the reader's risk. */
  temperatureRange: [number, number];
  /** Largest |μ_fit/μ_point − 1| over the calibration points. */
  maxRelativeResidual: number;
  warning: string | null;
}

/** Least-squares Andrade fit ln μ = A + B/T of calibration points (temperature °C, viscosity Pa·s). */
export function fitFluidViscosity(points: readonly ViscosityCalibrationPoint[]): FluidViscosityFit {
  const issues = new IssueList();
  if (points.length === 0) issues.add("points", "at least one calibration point is needed");
  points.forEach((point, i) => {
    issues.positive(`points.${i}.viscosity`, point.viscosity);
    if (typeof point.temperature !== "number" || !Number.isFinite(point.temperature)) {
      issues.add(`points.${i}.temperature`, "must be a finite number");
    } else if (point.temperature <= -KELVIN_OFFSET) {
      issues.add(`points.${i}.temperature`, "must be above absolute zero");
    }
  });
  issues.throwIfAny();

  let minimum = Number.POSITIVE_INFINITY;
  let maximum = Number.NEGATIVE_INFINITY;
  for (const point of points) {
    minimum = Math.min(minimum, point.temperature);
    maximum = Math.max(maximum, point.temperature);
  }

  if (minimum === maximum) {
    // One temperature (one point, or repeats of it) cannot fix B: fall back to the mean of ln μ.
    let sumOfLogs = 0;
    for (const point of points) sumOfLogs += Math.log(point.viscosity);
    const a = sumOfLogs / points.length;
    return {
      kind: "constant",
      a,
      b: 0,
      pointCount: points.length,
      temperatureRange: [minimum, maximum],
      maxRelativeResidual: maxRelativeResidual(points, a, 0),
      warning: `Only one calibration temperature (${minimum} °C): the viscosity is taken as constant, so the drop temperature is not accounted for.`,
    };
  }

  // Ordinary least squares of y = ln μ on x = 1/T.
  let sumX = 0;
  let sumY = 0;
  for (const point of points) {
    sumX += 1 / (point.temperature + KELVIN_OFFSET);
    sumY += Math.log(point.viscosity);
  }
  const meanX = sumX / points.length;
  const meanY = sumY / points.length;
  let sxx = 0;
  let sxy = 0;
  for (const point of points) {
    const dx = 1 / (point.temperature + KELVIN_OFFSET) - meanX;
    sxx += dx * dx;
    sxy += dx * (Math.log(point.viscosity) - meanY);
  }
  const b = sxy / sxx;
  const a = meanY - b * meanX;
  return {
    kind: "andrade",
    a,
    b,
    pointCount: points.length,
    temperatureRange: [minimum, maximum],
    maxRelativeResidual: maxRelativeResidual(points, a, b),
    warning:
      points.length === 2 ? "Two calibration points: the Andrade line passes through both, with no check of its fit." : null,
  };
}

function maxRelativeResidual(points: readonly ViscosityCalibrationPoint[], a: number, b: number): number {
  let largest = 0;
  for (const point of points) {
    const fitted = Math.exp(a + b / (point.temperature + KELVIN_OFFSET));
    largest = Math.max(largest, Math.abs(fitted / point.viscosity - 1));
  }
  return largest;
}

/** μ(T) = exp(A + B/T) (Pa·s), T from °C. */
export function viscosityAt(fit: FluidViscosityFit, temperatureC: number): number {
  return Math.exp(fit.a + fit.b / (temperatureC + KELVIN_OFFSET));
}

/**
 * Relative change of viscosity per kelvin, d ln μ/dT = −B/T² (1/K); negative for liquids. Pass it as
 * `fluid.viscosityTemperatureCoefficient` so the reduction carries u(T) into u(μ).
 */
export function viscosityTemperatureCoefficient(fit: FluidViscosityFit, temperatureC: number): number {
  const kelvin = temperatureC + KELVIN_OFFSET;
  return -fit.b / (kelvin * kelvin);
}
