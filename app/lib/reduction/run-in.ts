/**
 * How far a sphere released from rest falls before it is close enough to terminal velocity to be timed.
 * Pure: no I/O.
 */

/** The run-in must bring the sphere to this fraction of v∞: within 1 %, below a hand timing's usual uncertainty (common practice). */
export const RUN_IN_VELOCITY_FRACTION = 0.99;

/** Below this Re∞ Stokes' drag holds to within 2 % (Oseen's 3Re/16) and the approach is exponential. */
const STOKES_FLOW_REYNOLDS = 0.1;

/** −ln(1 − 0.99) − 0.99: the Stokes run-in in relaxation lengths, x = v∞τ(ln 100 − 0.99). */
const STOKES_RUN_IN_RELAXATION_LENGTHS = -Math.log(1 - RUN_IN_VELOCITY_FRACTION) - RUN_IN_VELOCITY_FRACTION;

/**
 * Relaxation time of a sphere in Stokes flow, with the added mass of the fluid it drags along (half its
 * displaced volume): τ = (ρs + ½ρf) d²/(18μ). Without the added mass a light sphere's τ would be far too short.
 */
export function relaxationTime(sphereDensity: number, fluidDensity: number, diameter: number, viscosity: number): number {
  return ((sphereDensity + 0.5 * fluidDensity) * diameter * diameter) / (18 * viscosity);
}

export interface RunInContext {
  sphereDensity: number;
  fluidDensity: number;
  g: number;
  /** v∞ (m/s) and its Reynolds number. */
  terminalVelocity: number;
  reynolds: number;
  /** τ = (ρs + ½ρf) d²/(18μ) (s), used in Stokes flow. */
  relaxationTime: number;
}

/**
 * Fall from rest to {@link RUN_IN_VELOCITY_FRACTION} of v∞ (m).
 *
 * In Stokes flow the approach is v = v∞(1 − e^(−t/τ)), so x = v∞τ(ln 100 − 0.99) ≈ 3.6 v∞τ. Beyond it
 * the drag grows faster than v and the approach is much shorter than τ suggests: a 5 mm steel sphere in
 * water has τ ≈ 12 s in Stokes terms, yet reaches 99 % of its ≈ 1 m/s within about a quarter of a metre.
 * There we integrate the equation of motion with the fluid's added mass and a quasi-steady drag along
 * the standard drag curve, (ρs + ½ρf) dv/dt = (ρs − ρf) g − drag(v), the approach of Clift, Grace &
 * Weber (1978), Bubbles, Drops, and Particles, ch. 11 (from memory), without the history (Basset)
 * force. The drag curve is Schiller–Naumann, with Newton's C_D = 0.44 once it falls below that
 * (about Re = 1000; a common practice in particle codes), scaled so that the drag balances the net
 * weight at the measured v∞. With u = v/v∞ and a₀ = |ρs − ρf| g/(ρs + ½ρf), the initial acceleration:
 *
 *   x = (v∞²/a₀) ∫₀^0.99 u du / (1 − u φ(u Re∞)/φ(Re∞)),   φ(Re) = C_D Re/24,
 *
 * taken by 8-point Gauss–Legendre in s = −ln(1 − u), which removes the integrand's pole at u = 1.
 */
export function runInLength(context: RunInContext): number {
  const { terminalVelocity: v, reynolds } = context;
  if (reynolds <= STOKES_FLOW_REYNOLDS) return STOKES_RUN_IN_RELAXATION_LENGTHS * v * context.relaxationTime;
  const initialAcceleration =
    (Math.abs(context.sphereDensity - context.fluidDensity) * context.g) / (context.sphereDensity + 0.5 * context.fluidDensity);
  const terminalDrag = dragRatio(reynolds);
  const halfWidth = 0.5 * -Math.log(1 - RUN_IN_VELOCITY_FRACTION);
  let integral = 0;
  for (let i = 0; i < GAUSS_NODES.length; i++) {
    for (const sign of SIGNS) {
      const s = halfWidth * (1 + sign * GAUSS_NODES[i]);
      const remaining = Math.exp(-s);
      const u = 1 - remaining;
      integral += GAUSS_WEIGHTS[i] * ((u * remaining) / (1 - (u * dragRatio(u * reynolds)) / terminalDrag));
    }
  }
  return ((v * v) / initialAcceleration) * halfWidth * integral;
}

/** φ(Re) = C_D Re/24 of the standard drag curve: Schiller–Naumann, floored at Newton's C_D = 0.44. */
function dragRatio(reynolds: number): number {
  return Math.max(1 + 0.15 * Math.pow(reynolds, 0.687), (0.44 * reynolds) / 24);
}

// 8-point Gauss–Legendre on [−1, 1], the positive nodes and their weights (Abramowitz & Stegun, Table 25.4).
const GAUSS_NODES = [0.1834346424956498, 0.525532409916329, 0.7966664774136267, 0.9602898564975363];
const GAUSS_WEIGHTS = [0.362683783378362, 0.3137066458778873, 0.2223810344533745, 0.1012285362903763];
const SIGNS = [-1, 1] as const;
