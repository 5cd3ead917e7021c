import { describe, expect, it } from "vitest";
import { holmBonferroni, partBiasByPeers, twoSidedPValue, welchTest, type PartFigure } from "./part-bias";
import { seededRandom } from "../../../tests/support/seeded-random";

describe("welchTest", () => {
  // NIST/SEMATECH e-Handbook §1.3.5.3, two-sample t-test example (AUTO83B: US cars n = 249, mean 20.14458 mpg,
  // s = 6.41470; Japanese cars n = 79, mean 30.48101, s = 6.10771). For unequal variances the handbook gives
  // T = −12.94627 and ν = 136.8750 (from memory; the summary figures reproduce both by Welch's formulas).
  it("reproduces the NIST e-Handbook §1.3.5.3 unequal-variance example: t = −12.946, ν = 136.875 (Welch 1947)", () => {
    const result = welchTest({ n: 249, mean: 20.14458, variance: 6.4147 ** 2 }, { n: 79, mean: 30.48101, variance: 6.10771 ** 2 })!;
    expect(result.t).toBeCloseTo(-12.94627, 3);
    expect(result.degreesOfFreedom).toBeCloseTo(136.875, 1);
    expect(result.pValue).toBeLessThan(1e-10);
  });

  it("gives no test without two values on each side or without spread", () => {
    expect(welchTest({ n: 1, mean: 0, variance: 0 }, { n: 5, mean: 0, variance: 1 })).toBeNull();
    expect(welchTest({ n: 3, mean: 0, variance: 0 }, { n: 3, mean: 1, variance: 0 })).toBeNull();
  });
});

describe("twoSidedPValue", () => {
  // NIST/SEMATECH e-Handbook §1.3.6.7.2, upper critical values of Student's t at 0.025 (so two-sided p = 0.05).
  it.each([
    [12.706, 1],
    [2.228, 10],
    [2.042, 30],
  ])("p(|T| ≥ %f, ν = %i) = 0.05 (NIST e-Handbook table 1.3.6.7.2)", (t, degreesOfFreedom) => {
    expect(twoSidedPValue(t, degreesOfFreedom)).toBeCloseTo(0.05, 3);
  });

  it("is 1 at t = 0 and symmetric in t", () => {
    expect(twoSidedPValue(0, 5)).toBe(1);
    expect(twoSidedPValue(-2.5, 7)).toBeCloseTo(twoSidedPValue(2.5, 7), 10);
  });
});

describe("holmBonferroni", () => {
  // Holm (1979) step-down procedure, on the worked example of Wikipedia's "Holm–Bonferroni method" article
  // (from memory): p = 0.01, 0.04, 0.03, 0.005 at α = 0.05. Sorted: 0.005 ≤ 0.05/4 and 0.01 ≤ 0.05/3 are
  // rejected; 0.03 > 0.05/2 stops the procedure, so 0.04 is never compared.
  it("rejects H1 and H4 of the worked example and stops at H3", () => {
    const results = holmBonferroni([0.01, 0.04, 0.03, 0.005], 0.05);
    expect(results.map((result) => result.rejected)).toEqual([true, false, false, true]);
    expect(results[2].level).toBeCloseTo(0.025, 12);
    expect(results[1].level).toBeNull();
  });
});

describe("partBiasByPeers", () => {
  const handIn = (partId: string, figure: number, labId = "lab", mode: PartFigure["mode"] = "viscometry"): PartFigure => ({
    partId,
    partKind: "fluid_lot",
    labId,
    mode,
    figure,
  });

  it("flags the one part whose hand-ins sit apart from its peers, not the peers, whatever the shared model bias", () => {
    // Every figure 8 % high (a reference model's own bias): only lot C, a further 12 % off, is flagged.
    const spread = [0.99, 1.0, 1.01, 1.005, 0.995];
    const figures = [
      ...spread.map((x) => handIn("A", 1.08 * x)),
      ...spread.map((x) => handIn("B", 1.08 * x * 1.002)),
      ...spread.map((x) => handIn("C", 1.08 * 1.12 * x)),
    ];
    const result = partBiasByPeers(figures, 0.05);
    expect(result.get("C")!.flagged).toBe(true);
    expect(result.get("C")!.comparisons[0].relativeToPeers).toBeCloseTo(0.12 / 1.001, 2);
    expect(result.get("A")!.flagged).toBe(false);
    expect(result.get("B")!.flagged).toBe(false);
    expect(result.get("C")!.testsInFamily).toBe(3);
  });

  it("keeps labs (and so drag and viscometry) apart and does not test a part with a single peer part", () => {
    const figures = [
      ...[1, 1.01, 0.99].map((x) => handIn("A", x, "drag-lab", "drag")),
      ...[1.2, 1.21, 1.19].map((x) => handIn("B", x, "viscometry-lab", "viscometry")),
      ...[1, 1.01, 0.99].map((x) => handIn("C", x, "viscometry-lab", "viscometry")),
    ];
    const result = partBiasByPeers(figures, 0.05);
    expect(result.get("A")!.comparisons[0]).toMatchObject({ mode: "drag", peerParts: 0, t: null, flagged: false });
    expect(result.get("B")!.comparisons[0]).toMatchObject({ peerParts: 1, t: null, flagged: false });
  });

  // Classes of 30 in one viscometry lab, five fluid lots of six hand-ins each. ln figure = a shared model bias
  // (uniform within ±6 %, redrawn per class: drag curve, wall factor) + N(0, 0.03): a ±0.3 K thermometer on
  // glycerol, whose viscosity falls about 9 %/K near 20 °C (Segur & Oberstar 1951 — from memory), gives 2.7 %,
  // and timing and diameter add the rest.
  function simulate(classes: number, offLot: number, seed: number) {
    const random = seededRandom(seed);
    const gauss = () => Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random());
    let classesWithCalibratedFlag = 0;
    let calibratedFlags = 0;
    let calibratedParts = 0;
    let offLotFlagged = 0;
    for (let c = 0; c < classes; c++) {
      const modelBias = (random() - 0.5) * 0.12;
      const figures: PartFigure[] = [];
      for (let i = 0; i < 30; i++) {
        const lot = i % 5;
        const recordError = lot === 0 ? offLot : 0;
        figures.push(handIn(`lot${lot}`, Math.exp(modelBias + recordError + 0.03 * gauss())));
      }
      const result = partBiasByPeers(figures, 0.05);
      const calibrated = (offLot === 0 ? [0, 1, 2, 3, 4] : [1, 2, 3, 4]).map((lot) => result.get(`lot${lot}`)!.flagged);
      calibratedParts += calibrated.length;
      calibratedFlags += calibrated.filter(Boolean).length;
      if (calibrated.some(Boolean)) classesWithCalibratedFlag++;
      if (result.get("lot0")!.flagged) offLotFlagged++;
    }
    return {
      perPart: calibratedFlags / calibratedParts,
      perClass: classesWithCalibratedFlag / classes,
      offLotRate: offLotFlagged / classes,
    };
  }

  // Each calibrated lot must be flagged at most at the nominal α. Holm's procedure (Holm 1979) aims at α for
  // the whole class (any of its five lots); Welch's test itself runs a little liberal at n = 6 against 24
  // (our own check: 1.4 % of clean pairs below p = 0.01), so the class rate comes out near 0.07: the bound
  // below is 0.09, about 3 binomial standard errors (0.0066 at 1,500 classes) above that.
  it("flags calibrated lots at most at the nominal rate (Monte Carlo, fixed seed)", () => {
    const { perPart, perClass } = simulate(1500, 0, 15);
    expect(perPart).toBeLessThanOrEqual(0.05);
    expect(perClass).toBeLessThanOrEqual(0.09);
  });

  it("flags a lot whose viscosity record is 10 % off in at least 90 % of classes of 30 (Monte Carlo, fixed seed)", () => {
    // A record 10 % low makes every μ/μ_ref of that lot 10 % high: ln 1.1 in ln figure.
    const { offLotRate, perPart } = simulate(1000, Math.log(1.1), 16);
    expect(offLotRate).toBeGreaterThanOrEqual(0.9);
    // Once the off lot is flagged it leaves the peers, so the four calibrated lots stay at the nominal rate.
    expect(perPart).toBeLessThanOrEqual(0.05);
  });
});
