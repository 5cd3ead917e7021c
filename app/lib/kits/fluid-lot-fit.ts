/**
 * What a fluid lot's page shows about its calibration: the Andrade fit of the reduction engine (the
 * same one every drop-log reduction uses), the fitted viscosity at usual room temperatures, and each
 * calibration point's residual and its check against handbook data.
 */
import type { CalibrationPoint } from "~/db/schema";
import { checkCalibrationPoints, type CalibrationPointCheck } from "~/lib/kits/glycerol-water";
import { fitFluidViscosity, viscosityAt, type FluidViscosityFit } from "~/lib/reduction/viscosity-model";

/** Temperatures (°C) at which the page quotes the fitted viscosity: the span of a home lab's room. */
export const quotedTemperaturesC = [15, 20, 25, 30] as const;

export type FluidLotCalibration = {
  fit: FluidViscosityFit;
  quoted: { temperatureC: number; viscosityPaS: number; extrapolated: boolean }[];
  /** The declared glycerol mass fraction the points are checked against, if any. */
  glycerolMassFraction: number | null;
  /** The points by temperature, with the fitted value, the residual (measured / fitted − 1) in per cent and the handbook check. */
  points: (CalibrationPointCheck & { fittedPaS: number; residualPercent: number })[];
};

export function fluidLotCalibration(
  calibration: CalibrationPoint[] | null,
  glycerolMassFraction: number | null = null,
): FluidLotCalibration | null {
  if (!calibration?.length) return null;
  const fit = fitFluidViscosity(calibration.map((point) => ({ temperature: point.temperatureC, viscosity: point.viscosityPaS })));
  const [low, high] = fit.temperatureRange;
  return {
    fit,
    quoted: quotedTemperaturesC.map((temperatureC) => ({
      temperatureC,
      viscosityPaS: viscosityAt(fit, temperatureC),
      extrapolated: temperatureC < low || temperatureC > high,
    })),
    glycerolMassFraction,
    points: checkCalibrationPoints(calibration, glycerolMassFraction).map((point) => {
      const fittedPaS = viscosityAt(fit, point.temperatureC);
      return { ...point, fittedPaS, residualPercent: (point.viscosityPaS / fittedPaS - 1) * 100 };
    }),
  };
}
