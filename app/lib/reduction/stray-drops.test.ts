import { describe, expect, it } from "vitest";
import { reduceFallingSphere } from "./falling-sphere";
import { findStrayDrops, MINIMUM_DROPS_FOR_STRAY_TEST } from "./stray-drops";
import { seededRandom } from "../../../tests/support/seeded-random";

/** Standard normal deviates by the Box–Muller transform (Box & Muller 1958). */
function normal(random: () => number): () => number {
  return () => Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random());
}

describe("findStrayDrops", () => {
  it("flags nothing in the issue's equal-reading logs [5.00, 5.00, 5.01], [5, 5, 5, 5.01] and nine 6.62 with a 6.63", () => {
    for (const times of [
      [5.0, 5.0, 5.01],
      [5, 5, 5, 5.01],
      [...new Array<number>(9).fill(6.62), 6.63],
    ]) {
      expect(findStrayDrops(times, { timeResolution: 0.01 }).strayDrops).toEqual([]);
    }
  });

  it("makes no test at six drops or fewer and says so (NIST/SEMATECH e-Handbook §1.3.5.17.1 caution)", () => {
    const finding = findStrayDrops([5.0, 5.01, 4.99, 5.0, 5.02, 9.5]);
    expect(finding.strayDrops).toEqual([]);
    expect(finding.check).toMatchObject({ code: "stray-drop-test-not-applicable", level: "info" });
    expect(finding.check?.message).toMatch(/§1\.3\.5\.17\.1/);
    expect(MINIMUM_DROPS_FOR_STRAY_TEST).toBe(7);
    // Seven drops are tested: the same mistimed drop is then flagged.
    expect(findStrayDrops([5.0, 5.01, 4.99, 5.0, 5.02, 4.98, 9.5]).strayDrops).toEqual([6]);
  });

  // With the 0.01 s resolution R₂ is taken from the deviation less half a step: (0.998 − 0.005)/0.3314 = 3.00;
  // below 25 drops λ₂ is Grubbs' critical value for n = 11 at α/r = 0.025, 2.46 (NIST §1.3.5.17.1 formula).
  it("flags both late drops of the issue's masking log and quotes R₂ > λ₂ (Rosner 1983; NIST §1.3.5.17.3)", () => {
    const finding = findStrayDrops([5.02, 4.98, 5.01, 4.99, 5.0, 5.03, 4.97, 5.02, 4.99, 5.01, 6.1, 6.2]);
    expect(finding.strayDrops).toEqual([11, 10]);
    expect(finding.check?.message).toMatch(/R2 = 3 > λ2 = 2\.46 \(n = 11\)/);
  });

  // ≥ 20,000 clean logs: n = 3…30, s log-uniform in 0.005…0.2 s, mean 3…30 s, read to 0.01 s. The
  // generalized ESD test has size α over the whole log (Rosner 1983), so at most α + 0.01 of the logs may
  // have any drop flagged (the bound; the binomial standard error at 20,000 logs is 0.0015).
  it("flags at most α + 0.01 of clean logs read to 0.01 s (Monte Carlo, fixed seed)", () => {
    const random = seededRandom(20261202);
    const gauss = normal(random);
    const alpha = 0.05;
    const logs = 24_000;
    let flagged = 0;
    // Also by band of n, so the zero rate of the untested logs (n ≤ 6) cannot hide an excess elsewhere.
    const bands = [7, 15, 25, 31];
    const bandLogs = [0, 0, 0];
    const bandFlagged = [0, 0, 0];
    for (let log = 0; log < logs; log++) {
      const n = 3 + Math.floor(random() * 28);
      const sd = 0.005 * Math.pow(40, random());
      const mean = 3 + random() * 27;
      const times = new Array<number>(n);
      for (let i = 0; i < n; i++) times[i] = Math.round((mean + sd * gauss()) * 100) / 100;
      const isFlagged = findStrayDrops(times, { alpha, timeResolution: 0.01 }).strayDrops.length > 0;
      if (isFlagged) flagged++;
      const band = bands.findIndex((upper) => n < upper) - 1;
      if (band >= 0) {
        bandLogs[band]++;
        if (isFlagged) bandFlagged[band]++;
      }
    }
    expect(flagged / logs).toBeLessThanOrEqual(alpha + 0.01);
    for (let band = 0; band < 3; band++) expect(bandFlagged[band] / bandLogs[band]).toBeLessThanOrEqual(alpha + 0.01);
  });

  it("is what the reduction reports: both late drops out of `withoutStrayDrops`, and the timing resolution honoured", () => {
    const base = {
      mode: "viscometry" as const,
      sphere: { diameter: 2e-3, mass: 32.7e-6 },
      fluid: { density: 1260 },
      column: { timedDistance: 0.2, runIn: 0.05 },
    };
    const masked = reduceFallingSphere({ ...base, drops: [5.02, 4.98, 5.01, 4.99, 5.0, 5.03, 4.97, 5.02, 4.99, 5.01, 6.1, 6.2] });
    expect(masked.drops.strayDrops).toEqual([11, 10]);
    expect(masked.withoutStrayDrops?.drops.n).toBe(10);
    expect(masked.checks.find((check) => check.code === "stray-drops")?.level).toBe("warn");
    // Nine 6.62 s and a 6.63 s: equal to a 0.01 s stopwatch; read to 0.001 s, the 6.63 s stands out.
    const ties = [...new Array<number>(9).fill(6.62), 6.63];
    expect(reduceFallingSphere({ ...base, drops: ties }).drops.strayDrops).toEqual([]);
    expect(reduceFallingSphere({ ...base, drops: ties, timeResolution: 0.001 }).drops.strayDrops).toEqual([9]);
    const five = reduceFallingSphere({ ...base, drops: [5, 5.01, 4.99, 5.02, 7] });
    expect(five.checks.find((check) => check.code === "stray-drop-test-not-applicable")?.level).toBe("info");
  });

  it("says it makes no test in words that agree with the drops at 0, 1 and 2", () => {
    expect([[], [5], [5, 5.01]].map((times) => findStrayDrops(times).check?.message.split(":")[0])).toEqual([
      "No stray-drop test with 0 drops",
      "No stray-drop test with 1 drop",
      "No stray-drop test with 2 drops",
    ]);
  });
});
