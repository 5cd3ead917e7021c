/**
 * A fluid lot's calibration held against handbook data: a declared glycerol–water mix is compared with
 * Cheng's correlation point by point, and any lot's points are checked for a mPa·s ↔ Pa·s slip.
 */
import type { CalibrationPoint } from "~/db/schema";

/** The temperature range Cheng fitted his formula over, in °C. */
const chengTemperatureRangeC = [0, 100] as const;

/**
 * Viscosity of a glycerol–water mixture in Pa·s, after N.-S. Cheng, "Formula for the viscosity of a
 * glycerol−water mixture", Ind. Eng. Chem. Res. 47 (2008) 3285–3288, for mass fraction 0–1 and
 * 0–100 °C: μ = μw^α μg^(1−α) with the mixing exponent α below (constants written from memory; the
 * tests hold them against Segur's published table).
 */
export function glycerolWaterViscosityPaS(glycerolMassFraction: number, temperatureC: number): number {
  const c = glycerolMassFraction;
  const t = temperatureC;
  const a = 0.705 - 0.0017 * t;
  const b = (4.9 + 0.036 * t) * a ** 2.5;
  const alpha = 1 - c + (a * b * c * (1 - c)) / (a * c + b * (1 - c));
  return waterViscosityPaS(t) ** alpha * (glycerolViscosityMPaS(t) / 1000) ** (1 - alpha);
}

/** Cheng's (2008) fit for pure water, in Pa·s (he writes it in mPa·s). */
export function waterViscosityPaS(temperatureC: number): number {
  const t = temperatureC;
  return (1.79 * Math.exp(((-1230 - t) * t) / (36100 + 360 * t))) / 1000;
}

function glycerolViscosityMPaS(t: number): number {
  return 12100 * Math.exp(((-1233 + t) * t) / (9900 + 70 * t));
}

/**
 * Standard uncertainties behind the tolerance, each relative (first order, as d ln μ):
 * - the correlation: over 0–40 °C it stays within 3.5 % of Segur's table (measured in the tests),
 *   read as a rectangular bound, so 3.5 %/√3 (GUM 4.3.7);
 * - the declared mass fraction: ±0.005 (half a per cent of glycerol, what weighing a kitchen-scale
 *   batch and glycerol's own few tenths of a per cent of water allow; common practice), rectangular;
 * - the calibration point's temperature: ±0.5 K, a household thermometer's usual accuracy, rectangular.
 * The two last enter through the correlation's own sensitivity, so the tolerance is tight for a dilute
 * mix and wide near pure glycerol, where half a per cent of water moves μ by several per cent.
 */
const correlationRelativeUncertainty = 0.035 / Math.sqrt(3);
const massFractionUncertainty = 0.005 / Math.sqrt(3);
const calibrationTemperatureUncertaintyK = 0.5 / Math.sqrt(3);
/** Coverage factor for the tolerance: about 95 % for a normal combined distribution (GUM 6.3.3). */
const toleranceCoverageFactor = 2;

/** The tolerance on recorded / correlation − 1 at one mass fraction and temperature. */
export function chengTolerance(glycerolMassFraction: number, temperatureC: number): number {
  const ln = (c: number, t: number) => Math.log(glycerolWaterViscosityPaS(c, t));
  // Central differences, one-sided at the ends of the mass-fraction range.
  const h = 0.002;
  const low = Math.max(0, glycerolMassFraction - h);
  const high = Math.min(1, glycerolMassFraction + h);
  const perMassFraction = (ln(high, temperatureC) - ln(low, temperatureC)) / (high - low);
  const perKelvin = (ln(glycerolMassFraction, temperatureC + 0.5) - ln(glycerolMassFraction, temperatureC - 0.5)) / 1;
  const combined = Math.hypot(
    correlationRelativeUncertainty,
    perMassFraction * massFractionUncertainty,
    perKelvin * calibrationTemperatureUncertaintyK,
  );
  return toleranceCoverageFactor * combined;
}

/**
 * Thresholds of the unit-slip check. Ratios are to the correlation for a declared mix; the absolute
 * bounds hold for any lot.
 * - A factor of 1000 within half a decade (316–3162): a value in mPa·s typed into the Pa·s box, or a
 *   value in Pa·s divided by 1000 once more. No error in the declared mix short of water declared
 *   for pure glycerol comes near it.
 * - Above 100 Pa·s: a 3 mm steel sphere then falls 200 mm in some ten minutes, far too slow for a
 *   timed drop, so no kit fluid is chosen that thick; a mPa·s figure of any syrup or strong glycerol
 *   mix (100 mPa·s and up) typed as Pa·s lands above it.
 * - Below half of water's viscosity at the same temperature: every kit fluid (water, its mixes with
 *   glycerol or sugar, syrups, oils) is at least as viscous as water; half leaves room for a thermometer
 *   some 25 K out, while a slip puts the value a thousand times lower.
 */
const unitSlipRatio = { centre: 1000, halfWidthDecades: 0.5 } as const;
const maximumKitFluidViscosityPaS = 100;
const minimumFractionOfWater = 0.5;

export type CalibrationFinding =
  | { kind: "agrees"; differencePercent: number; tolerancePercent: number }
  | { kind: "outside-tolerance"; differencePercent: number; tolerancePercent: number }
  | { kind: "unit-slip"; direction: "too-high" | "too-low"; basis: "correlation" | "plausible-range" }
  | { kind: "not-compared" };

export type CalibrationPointCheck = CalibrationPoint & {
  /** Cheng's value at this temperature for the declared mix; null without a mix or outside 0–100 °C. */
  handbookPaS: number | null;
  finding: CalibrationFinding;
};

function looksLikeUnitSlip(ratio: number): "too-high" | "too-low" | null {
  const decades = Math.log10(ratio);
  const slip = Math.log10(unitSlipRatio.centre);
  if (Math.abs(decades - slip) <= unitSlipRatio.halfWidthDecades) return "too-high";
  if (Math.abs(decades + slip) <= unitSlipRatio.halfWidthDecades) return "too-low";
  return null;
}

/** Each calibration point checked, sorted by temperature. */
export function checkCalibrationPoints(calibration: CalibrationPoint[], glycerolMassFraction: number | null): CalibrationPointCheck[] {
  const [lowest, highest] = chengTemperatureRangeC;
  return [...calibration]
    .sort((a, b) => a.temperatureC - b.temperatureC)
    .map((point) => {
      const inRange = point.temperatureC >= lowest && point.temperatureC <= highest;
      const handbookPaS =
        glycerolMassFraction !== null && inRange ? glycerolWaterViscosityPaS(glycerolMassFraction, point.temperatureC) : null;
      if (handbookPaS !== null) {
        const ratio = point.viscosityPaS / handbookPaS;
        const slip = looksLikeUnitSlip(ratio);
        if (slip) return { ...point, handbookPaS, finding: { kind: "unit-slip", direction: slip, basis: "correlation" } };
        const tolerance = chengTolerance(glycerolMassFraction!, point.temperatureC);
        const differencePercent = (ratio - 1) * 100;
        const kind = Math.abs(ratio - 1) > tolerance ? "outside-tolerance" : "agrees";
        return { ...point, handbookPaS, finding: { kind, differencePercent, tolerancePercent: tolerance * 100 } };
      }
      // Supercooled water is thicker than at 0 °C, so water at 0 °C still bounds the floor from below.
      const floor = minimumFractionOfWater * waterViscosityPaS(Math.min(Math.max(point.temperatureC, lowest), highest));
      if (point.viscosityPaS > maximumKitFluidViscosityPaS)
        return { ...point, handbookPaS, finding: { kind: "unit-slip", direction: "too-high", basis: "plausible-range" } };
      if (point.viscosityPaS < floor)
        return { ...point, handbookPaS, finding: { kind: "unit-slip", direction: "too-low", basis: "plausible-range" } };
      return { ...point, handbookPaS, finding: { kind: "not-compared" } };
    });
}

const formatPercent = (value: number) => `${value > 0 ? "+" : ""}${Number(value.toPrecision(2))} %`;
const listTemperatures = (points: CalibrationPoint[]) => points.map((point) => `${point.temperatureC} °C`).join(", ");

/** The checks as the warnings a part page and an import show: one for unit slips, one for disagreements. */
export function calibrationCheckMessages(checks: CalibrationPointCheck[], glycerolMassFraction: number | null): string[] {
  const messages: string[] = [];
  const high = checks.filter((check) => check.finding.kind === "unit-slip" && check.finding.direction === "too-high");
  const low = checks.filter((check) => check.finding.kind === "unit-slip" && check.finding.direction === "too-low");
  const against =
    glycerolMassFraction !== null ? `the handbook value for a glycerol mass fraction of ${glycerolMassFraction} (Cheng 2008)` : null;
  if (high.length) {
    messages.push(
      `The viscosity at ${listTemperatures(high)} is ${
        high.every((check) => check.finding.kind === "unit-slip" && check.finding.basis === "correlation")
          ? `about 1000 times ${against}`
          : `above ${maximumKitFluidViscosityPaS} Pa·s, thicker than any kit fluid`
      }: it looks like a value in mPa·s typed as Pa·s. Divide it by 1000.`,
    );
  }
  if (low.length) {
    messages.push(
      `The viscosity at ${listTemperatures(low)} is ${
        low.every((check) => check.finding.kind === "unit-slip" && check.finding.basis === "correlation")
          ? `about 1000 times below ${against}`
          : "less than half of water's at that temperature"
      }: it looks like a value in Pa·s divided by 1000 again. Check the unit.`,
    );
  }
  const off = checks.filter((check) => check.finding.kind === "outside-tolerance");
  if (off.length && against) {
    const details = off
      .map((check) => {
        const finding = check.finding as Extract<CalibrationFinding, { kind: "outside-tolerance" }>;
        return `${check.temperatureC} °C: ${formatPercent(finding.differencePercent)} (tolerance ±${Number(finding.tolerancePercent.toPrecision(2))} %)`;
      })
      .join("; ");
    messages.push(
      `The calibration differs from ${against} by more than its tolerance at ${details}. Check the declared mass fraction, the thermometer and the viscosity readings.`,
    );
  }
  return messages;
}
