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
  /**
   * Residual standard error of the fit on ln μ, s = √(Σ rᵢ²/(N − 2)) (a relative figure), and what
   * {@link calibrationUncertainty} needs to carry it to any T: the mean of x = 1/T and Sxx = Σ(xᵢ − x̄)².
   * Null when the fit has no residual degrees of freedom (two temperatures, or a constant model with one).
   */
  residual: { standardError: number; degreesOfFreedom: number; meanInverseTemperature: number; sxx: number } | null;
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
    let sumOfSquares = 0;
    for (const point of points) sumOfSquares += (Math.log(point.viscosity) - a) ** 2;
    const degreesOfFreedom = points.length - 1;
    return {
      kind: "constant",
      a,
      b: 0,
      pointCount: points.length,
      temperatureRange: [minimum, maximum],
      maxRelativeResidual: maxRelativeResidual(points, a, 0),
      // Repeats at one temperature: the mean of ln μ, with sxx = 0 so only its own standard error remains.
      residual:
        degreesOfFreedom > 0
          ? {
              standardError: Math.sqrt(sumOfSquares / degreesOfFreedom),
              degreesOfFreedom,
              meanInverseTemperature: 1 / (minimum + KELVIN_OFFSET),
              sxx: 0,
            }
          : null,
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
  let sumOfSquares = 0;
  for (const point of points) sumOfSquares += (Math.log(point.viscosity) - a - b / (point.temperature + KELVIN_OFFSET)) ** 2;
  const degreesOfFreedom = points.length - 2;
  return {
    kind: "andrade",
    a,
    b,
    pointCount: points.length,
    temperatureRange: [minimum, maximum],
    maxRelativeResidual: maxRelativeResidual(points, a, b),
    residual:
      degreesOfFreedom > 0
        ? { standardError: Math.sqrt(sumOfSquares / degreesOfFreedom), degreesOfFreedom, meanInverseTemperature: meanX, sxx }
        : null,
    warning: points.length === 2 ? "Two calibration points: the Andrade line passes through both, with no check of its fit." : null,
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

/**
 * Relative standard uncertainty of the fitted μ at T from the calibration's own scatter: the standard
 * error of the regression line's mean at x₀ = 1/T, u(ln μ̂) = s·√(1/N + (x₀ − x̄)²/Sxx) (ordinary least
 * squares; e.g. Draper & Smith, Applied Regression Analysis, §1.4 — from memory), with N − 2 degrees of
 * freedom. Zero with no residual degrees of freedom: the fit cannot tell its own uncertainty then, which
 * the fit's `warning` already says.
 */
export function calibrationUncertainty(
  fit: Pick<FluidViscosityFit, "pointCount" | "residual">,
  temperatureC: number,
): { relative: number; degreesOfFreedom: number } {
  const residual = fit.residual;
  if (!residual) return { relative: 0, degreesOfFreedom: Number.POSITIVE_INFINITY };
  const offset = 1 / (temperatureC + KELVIN_OFFSET) - residual.meanInverseTemperature;
  const leverage = 1 / fit.pointCount + (residual.sxx > 0 ? (offset * offset) / residual.sxx : 0);
  return { relative: residual.standardError * Math.sqrt(leverage), degreesOfFreedom: residual.degreesOfFreedom };
}
