/**
 * The "real world" the demo's invented drop logs come from. On purpose it is not the model the server
 * reduces with, so the demo's figures scatter as a real class's do instead of sitting on 1:
 *
 * - drag from the standard drag curve as Clift, Grace & Weber (1978) Table 5.2 tabulates it in pieces
 *   (the reduction compares with Stokes or Schiller–Naumann);
 * - the wall from Di Felice (1996), which holds at any Reynolds number (the reduction uses the lab's
 *   creeping-flow method where it applies);
 * - a thermometer good to ±0.5 K read to the lab's resolution, so the fluid is never exactly at the
 *   temperature written down;
 * - a stopwatch with a personal reaction bias per student and a scatter per drop, read to 0.01 s.
 *
 * Demo data only: no test takes an expected value from here.
 */
import type { Faker } from "@faker-js/faker";
import { diFeliceWallFactor } from "~/lib/reduction";

const G = 9.80665;

/**
 * The standard drag curve of a smooth sphere, Clift, Grace & Weber (1978) Table 5.2, the ranges a
 * home column can reach (Re ≤ 1500); w = log10 Re. Coefficients from memory.
 */
export function standardDragCurve(reynolds: number): number {
  const w = Math.log10(reynolds);
  if (reynolds <= 0.01) return 3 / 16 + 24 / reynolds;
  if (reynolds <= 20) return (24 / reynolds) * (1 + 0.1315 * reynolds ** (0.82 - 0.05 * w));
  if (reynolds <= 260) return (24 / reynolds) * (1 + 0.1935 * reynolds ** 0.6305);
  if (reynolds <= 1500) return 10 ** (1.6435 - 1.1242 * w + 0.1558 * w * w);
  throw new RangeError(`The demo's drag curve stops at Re = 1500 (asked for ${reynolds.toFixed(0)}).`);
}

export type SettlingCase = {
  diameterM: number;
  sphereDensityKgM3: number;
  fluidDensityKgM3: number;
  viscosityPaS: number;
  columnDiameterM: number;
};

/**
 * Terminal velocity in the column: the force balance with the standard drag curve, solved by fixed-point
 * iteration on the unbounded velocity, then slowed by Di Felice's wall factor at the unbounded Re.
 */
export function settlingVelocity(settling: SettlingCase): number {
  const { diameterM: d, sphereDensityKgM3: sphere, fluidDensityKgM3: fluid, viscosityPaS: mu } = settling;
  const buoyantWeight = ((sphere - fluid) * G * Math.PI * d ** 3) / 6;
  const area = (Math.PI * d * d) / 4;
  let velocity = buoyantWeight / (3 * Math.PI * mu * d);
  for (let step = 0; step < 60; step++) {
    const next = Math.sqrt(buoyantWeight / (0.5 * fluid * standardDragCurve((fluid * velocity * d) / mu) * area));
    // Damped: the undamped step oscillates near Re ≈ 1.
    velocity = 0.5 * (velocity + next);
  }
  return velocity * diFeliceWallFactor(d / settling.columnDiameterM, (fluid * velocity * d) / mu);
}

/** A normal draw from two of faker's uniform ones (Box–Muller), so the demo stays reproducible from its seed. */
export function normal(faker: Faker, standardDeviation: number): number {
  const u = 1 - faker.number.float({ min: 0, max: 1 });
  const v = faker.number.float({ min: 0, max: 1 });
  return standardDeviation * Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

/** Rounds to a reading resolution, as an instrument's display does. */
export function read(value: number, resolution: number): number {
  const digits = Math.max(0, Math.ceil(-Math.log10(resolution)));
  return Number((Math.round(value / resolution) * resolution).toFixed(digits));
}

/**
 * One student's hand-timed stopwatch. Reaction time at start and stop differs by a personal bias and
 * scatters from drop to drop; the sizes (40 ms bias, 60 ms scatter) are common practice for hand timing.
 */
export function stopwatch(faker: Faker): (trueTimeS: number) => number {
  const bias = normal(faker, 0.04);
  return (trueTimeS) => read(trueTimeS + bias + normal(faker, 0.06), 0.01);
}

/** A thermometer good to ±0.5 K (a rectangular error, as GUM 4.3.7 treats a stated accuracy), read to `resolution`. */
export function thermometerReading(faker: Faker, trueTemperatureC: number, resolution: number): number {
  return read(trueTemperatureC + faker.number.float({ min: -0.5, max: 0.5 }), resolution);
}
