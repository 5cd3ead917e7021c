/**
 * Kit-part quality: do the hand-ins made with one part differ from those made with its peers? A sphere
 * whose recorded diameter is off, or a fluid lot whose viscosity record is off, shifts all its hand-ins'
 * normalised figures the same way. The figures are compared with the other parts' figures in the same
 * lab, not with 1, because the reference model's own bias (drag curve, wall factor, thermometer) moves
 * every part alike and would otherwise be blamed on each of them. Pure: the server feeds it the figures.
 */
import { studentTQuantile } from "~/lib/reduction/statistics";
import { MINIMUM_HAND_INS_FOR_BIAS, MINIMUM_PEER_PARTS } from "./part-bias-thresholds";

export type PartKind = "sphere" | "fluid_lot" | "column";

/** One hand-in as the test reads it: the part it used (of one kind), its lab and mode, its figure. */
export type PartFigure = { partId: string; partKind: PartKind; labId: string; mode: "drag" | "viscometry"; figure: number };

export type SampleSummary = { n: number; mean: number; variance: number };

export type WelchResult = { t: number; degreesOfFreedom: number; pValue: number };

/**
 * Welch's two-sample t test for unequal variances (Welch 1947, Biometrika 34, 28–35; NIST/SEMATECH
 * e-Handbook §1.3.5.3): t = (x̄₁ − x̄₂)/√(s₁²/n₁ + s₂²/n₂), with the Welch–Satterthwaite degrees of
 * freedom ν = (s₁²/n₁ + s₂²/n₂)² / ((s₁²/n₁)²/(n₁ − 1) + (s₂²/n₂)²/(n₂ − 1)). Two-sided p value.
 * Null when either sample has fewer than two values or there is no spread at all.
 */
export function welchTest(first: SampleSummary, second: SampleSummary): WelchResult | null {
  if (first.n < 2 || second.n < 2) return null;
  const a = first.variance / first.n;
  const b = second.variance / second.n;
  if (!(a + b > 0)) return null;
  const t = (first.mean - second.mean) / Math.sqrt(a + b);
  const degreesOfFreedom = (a + b) ** 2 / ((a * a) / (first.n - 1) + (b * b) / (second.n - 1));
  return { t, degreesOfFreedom, pValue: twoSidedPValue(t, degreesOfFreedom) };
}

// Below this the p value is reported as this floor: every Holm threshold of a course is far above it.
const SMALLEST_P_VALUE = 1e-15;

/**
 * P(|T| ≥ |t|) for Student's t with ν degrees of freedom, found by bisection on the quantile the engine
 * already uses (stdlib), in log p, to a relative precision of about 1e-7: a few dozen tests per course,
 * so the cost is small and no second special-function package is needed.
 */
export function twoSidedPValue(t: number, degreesOfFreedom: number): number {
  const target = Math.abs(t);
  if (target === 0) return 1;
  const quantileAt = (logP: number) => studentTQuantile(1 - Math.exp(logP) / 2, degreesOfFreedom);
  let low = Math.log(SMALLEST_P_VALUE);
  let high = 0;
  if (quantileAt(low) <= target) return SMALLEST_P_VALUE;
  // The quantile falls as p rises: keep quantile(low) > target ≥ quantile(high).
  for (let i = 0; i < 60 && high - low > 1e-7; i++) {
    const middle = (low + high) / 2;
    if (quantileAt(middle) > target) low = middle;
    else high = middle;
  }
  return Math.exp((low + high) / 2);
}

/**
 * Holm's step-down procedure (Holm 1979, Scand. J. Statist. 6, 65–70): sort the m p values, compare the
 * j-th smallest with α/(m − j + 1), and reject up to the first that fails. Returns, per input, whether it
 * is rejected and the level it was compared with (null beyond the first failure, where nothing is compared).
 */
export function holmBonferroni(pValues: readonly number[], alpha: number): { rejected: boolean; level: number | null }[] {
  const m = pValues.length;
  const order = pValues.map((_, index) => index).sort((x, y) => pValues[x] - pValues[y]);
  const results = pValues.map(() => ({ rejected: false, level: null as number | null }));
  for (let rank = 0; rank < m; rank++) {
    const index = order[rank];
    const level = alpha / (m - rank);
    results[index].level = level;
    if (!(pValues[index] <= level)) break;
    results[index].rejected = true;
  }
  return results;
}

/** A part's comparison with its peers in one lab. */
export type PeerComparison = {
  labId: string;
  mode: "drag" | "viscometry";
  /** Hand-ins with the part in this lab. */
  n: number;
  /** Hand-ins with the other (unflagged) parts of the same kind in this lab, when gathered, and how many parts those are. */
  peerCount: number;
  peerParts: number;
  /** exp(mean ln figure − peers' mean ln figure) − 1: how far the part's hand-ins sit from its peers'; null when untested. */
  relativeToPeers: number | null;
  /** Welch's t, ν and two-sided p; null when the part was not tested (too few hand-ins or peers). */
  t: number | null;
  degreesOfFreedom: number | null;
  pValue: number | null;
  /** The Holm level the p value was compared with; null when not tested or not reached. */
  holmLevel: number | null;
  flagged: boolean;
};

export type PartBias = {
  /** True when any of the part's lab comparisons is rejected by Holm's procedure. */
  flagged: boolean;
  comparisons: PeerComparison[];
  /** Number of tests in the course's family (m of Holm's procedure). */
  testsInFamily: number;
};

/**
 * Each part against its peers: for every (lab, part kind, part) with enough hand-ins, Welch's test of
 * ln(figure) of the part's hand-ins against those of the other parts of the same kind in the same lab
 * (a lab has one mode, so drag and viscometry are never mixed), then Holm's correction over all the
 * tests given (the course). A part is flagged when one of its tests is rejected at family level α.
 *
 * One part is flagged per round, the one with the smallest p among those Holm rejects; it then no longer
 * counts as a peer of the others, which are tested again (our choice, in the step-down spirit of Holm's
 * procedure: the flagged parts keep the first ranks of the family). Otherwise one lot 12 % off among
 * three drags both calibrated lots' peer means with it, and they would be flagged too. The rounds stop
 * when Holm rejects no new part; a flagged part keeps the test that flagged it.
 */
export function partBiasByPeers(handIns: readonly PartFigure[], alpha: number): Map<string, PartBias> {
  // Group by lab and kind, then by part, keeping ln figures.
  const groups = new Map<string, Group>();
  for (const handIn of handIns) {
    const key = `${handIn.labId}\u0000${handIn.partKind}`;
    let group = groups.get(key);
    if (!group) groups.set(key, (group = { labId: handIn.labId, mode: handIn.mode, byPart: new Map() }));
    let logs = group.byPart.get(handIn.partId);
    if (!logs) group.byPart.set(handIn.partId, (logs = []));
    logs.push(Math.log(handIn.figure));
  }

  // Comparisons are keyed by group and part; a flagged part's stays as it was when it was flagged.
  const flagged = new Map<string, { partId: string; comparison: PeerComparison }>();
  let latest: { key: string; partId: string; comparison: PeerComparison }[] = [];
  let testsInFamily = 0;
  for (;;) {
    latest = compareWithPeers(groups, flagged);
    const tested = latest.filter((entry) => entry.comparison.pValue !== null);
    testsInFamily = Math.max(testsInFamily, tested.length);
    const decisions = holmBonferroni(
      tested.map((entry) => entry.comparison.pValue as number),
      alpha,
    );
    let strongest: (typeof tested)[number] | null = null;
    tested.forEach((entry, i) => {
      entry.comparison.holmLevel = decisions[i].level;
      if (
        decisions[i].rejected &&
        !flagged.has(entry.key) &&
        (!strongest || (entry.comparison.pValue as number) < (strongest.comparison.pValue as number))
      ) {
        strongest = entry;
      }
    });
    if (!strongest) break;
    const chosen: (typeof tested)[number] = strongest;
    chosen.comparison.flagged = true;
    flagged.set(chosen.key, chosen);
  }

  const byPart = new Map<string, PartBias>();
  for (const entry of latest) {
    const { partId, comparison } = flagged.get(entry.key) ?? entry;
    let bias = byPart.get(partId);
    if (!bias) byPart.set(partId, (bias = { flagged: false, comparisons: [], testsInFamily }));
    bias.comparisons.push(comparison);
    if (comparison.flagged) bias.flagged = true;
  }
  for (const bias of byPart.values()) bias.testsInFamily = testsInFamily;
  return byPart;
}

type Group = { labId: string; mode: PartFigure["mode"]; byPart: Map<string, number[]> };

/** One round: every part of every group against the hand-ins of the group's other parts not yet flagged. */
function compareWithPeers(
  groups: Map<string, Group>,
  flagged: Map<string, unknown>,
): { key: string; partId: string; comparison: PeerComparison }[] {
  const comparisons: { key: string; partId: string; comparison: PeerComparison }[] = [];
  for (const [groupKey, group] of groups) {
    const peerIds = [...group.byPart.keys()].filter((id) => !flagged.has(`${groupKey}\u0000${id}`));
    for (const [partId, logs] of group.byPart) {
      const own = summarise(logs);
      const peerParts = peerIds.filter((id) => id !== partId).length;
      // Peers are only gathered for a part that can be tested, so a class where every student has a
      // sphere of their own costs no more than one pass.
      const peers: number[] = [];
      if (own.n >= MINIMUM_HAND_INS_FOR_BIAS && peerParts >= MINIMUM_PEER_PARTS) {
        for (const otherId of peerIds) if (otherId !== partId) for (const value of group.byPart.get(otherId)!) peers.push(value);
      }
      const others = summarise(peers);
      const testable = others.n >= MINIMUM_HAND_INS_FOR_BIAS;
      const welch = testable ? welchTest(own, others) : null;
      comparisons.push({
        key: `${groupKey}\u0000${partId}`,
        partId,
        comparison: {
          labId: group.labId,
          mode: group.mode,
          n: own.n,
          peerCount: others.n,
          peerParts,
          relativeToPeers: welch ? Math.exp(own.mean - others.mean) - 1 : null,
          t: welch?.t ?? null,
          degreesOfFreedom: welch?.degreesOfFreedom ?? null,
          pValue: welch?.pValue ?? null,
          holmLevel: null,
          flagged: false,
        },
      });
    }
  }
  return comparisons;
}

/** n, mean and sample variance by two passes. */
function summarise(values: readonly number[]): SampleSummary {
  const n = values.length;
  let sum = 0;
  for (const value of values) sum += value;
  const mean = n > 0 ? sum / n : 0;
  let squares = 0;
  for (const value of values) squares += (value - mean) ** 2;
  return { n, mean, variance: n > 1 ? squares / (n - 1) : 0 };
}
