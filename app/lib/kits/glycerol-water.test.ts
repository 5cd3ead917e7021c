import { describe, expect, it } from "vitest";
import {
  calibrationCheckMessages,
  checkCalibrationPoints,
  chengTolerance,
  glycerolWaterViscosityPaS,
  waterViscosityPaS,
} from "./glycerol-water";

/**
 * Viscosity of aqueous glycerol in mPa·s, Segur & Oberstar, Ind. Eng. Chem. 43 (1951) 2117, as reproduced
 * in the glycerine producers' viscosity table (checked against a stored copy of that table; the
 * attribution to Segur & Oberstar is from memory). Rows: glycerol mass %; columns: 0, 10, 20, 30, 40 °C.
 */
const segurTemperaturesC = [0, 10, 20, 30, 40];
const segurTable: [massPercent: number, mPaS: number[]][] = [
  [0, [1.792, 1.308, 1.005, 0.8007, 0.656]],
  [10, [2.44, 1.74, 1.31, 1.03, 0.826]],
  [20, [3.44, 2.41, 1.76, 1.35, 1.07]],
  [30, [5.14, 3.49, 2.5, 1.87, 1.46]],
  [40, [8.25, 5.37, 3.72, 2.72, 2.07]],
  [50, [14.6, 9.01, 6.0, 4.21, 3.1]],
  [60, [29.9, 17.4, 10.8, 7.19, 5.08]],
  [65, [45.7, 25.3, 15.2, 9.85, 6.8]],
  [67, [55.5, 29.9, 17.7, 11.3, 7.73]],
  [70, [76, 38.8, 22.5, 14.1, 9.4]],
  [75, [132, 65.2, 35.5, 21.2, 13.6]],
  [80, [255, 116, 60.1, 33.9, 20.8]],
  [85, [540, 223, 109, 58, 33.5]],
  [90, [1310, 498, 219, 109, 60]],
  [95, [3690, 1270, 523, 237, 121]],
  [100, [12070, 3900, 1410, 612, 284]],
];
const segur = (massPercent: number) => segurTable.find(([percent]) => percent === massPercent)![1];
const lot = (massPercent: number, scale = 1) =>
  segur(massPercent).map((mPaS, index) => ({ temperatureC: segurTemperaturesC[index], viscosityPaS: (mPaS / 1000) * scale }));

describe("Cheng's (2008) glycerol–water viscosity", () => {
  it("gives pure glycerol ≈ 1410 mPa·s and water ≈ 1.005 mPa·s at 20 °C (Segur & Oberstar 1951)", () => {
    expect(glycerolWaterViscosityPaS(1, 20) * 1000).toBeCloseTo(1410, -1);
    expect(glycerolWaterViscosityPaS(0, 20) * 1000).toBeCloseTo(1.005, 2);
    expect(waterViscosityPaS(20) * 1000).toBeCloseTo(1.005, 2);
  });

  it("stays within 3.5 % of Segur's table at every mass fraction from 0 to 100 % and 0 to 40 °C (the bound the tolerance uses)", () => {
    for (const [percent, row] of segurTable) {
      row.forEach((mPaS, index) => {
        const relative = (glycerolWaterViscosityPaS(percent / 100, segurTemperaturesC[index]) * 1000) / mPaS - 1;
        expect(Math.abs(relative), `${percent} % at ${segurTemperaturesC[index]} °C`).toBeLessThanOrEqual(0.035);
      });
    }
  });

  it("widens the tolerance near pure glycerol, where half a per cent of water moves μ by several per cent", () => {
    // Segur's table at 20 °C: 90 → 95 % multiplies μ by 523/219 ≈ 2.4 (about 17 % per point of glycerol),
    // 50 → 60 % by 10.8/6.0 ≈ 1.8 (about 6 % per point).
    expect(chengTolerance(0.95, 20)).toBeGreaterThan(2 * chengTolerance(0.5, 20));
    expect(chengTolerance(0.5, 20)).toBeGreaterThan(0.04);
  });
});

describe("checkCalibrationPoints", () => {
  it("finds Segur's own values for 50, 85 and 95 % within tolerance of the declared mix", () => {
    for (const percent of [50, 85, 95]) {
      const checks = checkCalibrationPoints(lot(percent), percent / 100);
      expect(
        checks.map((check) => check.finding.kind),
        `${percent} %`,
      ).toEqual(["agrees", "agrees", "agrees", "agrees", "agrees"]);
    }
  });

  it("flags a lot declared 95 % whose readings are Segur's 90 % values, and words it as a disagreement with the mix", () => {
    const checks = checkCalibrationPoints(lot(90), 0.95);
    expect(checks.every((check) => check.finding.kind === "outside-tolerance")).toBe(true);
    const messages = calibrationCheckMessages(checks, 0.95);
    expect(messages).toHaveLength(1);
    expect(messages[0]).toContain("glycerol mass fraction of 0.95 (Cheng 2008) by more than its tolerance at 0 °C: ");
    expect(messages[0]).toContain("20 °C: -58 %");
  });

  it("flags a one-point mis-declaration near 95 %: Segur's 94 % at 20 °C (437 mPa·s) is −15 % off a declared 95 %", () => {
    const [check] = checkCalibrationPoints([{ temperatureC: 20, viscosityPaS: 0.437 }], 0.95);
    expect(check.finding.kind).toBe("outside-tolerance");
  });

  it("calls a value 1000 times the declared mix's a mPa·s typed as Pa·s (Segur's 85 % at 20 °C, 109 mPa·s, typed as 109)", () => {
    const checks = checkCalibrationPoints(
      [
        { temperatureC: 20, viscosityPaS: 109 },
        { temperatureC: 30, viscosityPaS: 0.058 },
      ],
      0.85,
    );
    expect(checks.map((check) => check.finding.kind)).toEqual(["unit-slip", "agrees"]);
    expect(calibrationCheckMessages(checks, 0.85)).toEqual([
      "The viscosity at 20 °C is about 1000 times the handbook value for a glycerol mass fraction of 0.85 (Cheng 2008): it looks like a value in mPa·s typed as Pa·s. Divide it by 1000.",
    ]);
  });

  it("calls a declared mix's value 1000 times too low a double conversion", () => {
    const checks = checkCalibrationPoints(lot(60, 1 / 1000), 0.6);
    expect(checks.every((check) => check.finding.kind === "unit-slip" && check.finding.direction === "too-low")).toBe(true);
  });

  it("without a declared mix, flags a point above 100 Pa·s or below half of water's viscosity, and leaves plausible ones alone", () => {
    const checks = checkCalibrationPoints(
      [
        { temperatureC: 20, viscosityPaS: 109 }, // 85 % glycerol's 109 mPa·s typed as Pa·s
        { temperatureC: 25, viscosityPaS: 0.0000109 }, // 10.9 mPa·s divided by 1000 twice
        { temperatureC: 40, viscosityPaS: 0.000656 }, // Segur's water at 40 °C, below 1 mPa·s yet genuine
        { temperatureC: 30, viscosityPaS: 0.058 },
      ],
      null,
    );
    expect(checks.map((check) => [check.temperatureC, check.finding.kind])).toEqual([
      [20, "unit-slip"],
      [25, "unit-slip"],
      [30, "not-compared"],
      [40, "not-compared"],
    ]);
    expect(checks.every((check) => check.handbookPaS === null)).toBe(true);
    const messages = calibrationCheckMessages(checks, null);
    expect(messages[0]).toContain("at 20 °C is above 100 Pa·s");
    expect(messages[1]).toContain("at 25 °C is less than half of water's");
  });

  it("does not compare a declared mix outside Cheng's 0–100 °C, but still checks its unit", () => {
    const [cold] = checkCalibrationPoints([{ temperatureC: -5, viscosityPaS: 0.5 }], 0.8);
    expect(cold.handbookPaS).toBeNull();
    expect(cold.finding.kind).toBe("not-compared");
  });
});
