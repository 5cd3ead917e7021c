import { describe, expect, it } from "vitest";
import { ReductionInputError } from "./errors";
import { wallFactor } from "./wall";

// Expected values are the published formulas evaluated by hand (not tabulated values: Happel & Brenner's
// and Clift, Grace & Weber's tables were not available to check against).
describe("wallFactor", () => {
  it("Faxén: 1 − 2.104λ + 2.09λ³ − 0.95λ⁵", () => {
    // λ = 0.1: 1 − 0.2104 + 0.00209 − 0.0000095 = 0.7916805
    expect(wallFactor(0.1, "faxen")).toBeCloseTo(0.7916805, 7);
    // λ = 0.3: 1 − 0.6312 + 0.056430 − 0.0023085 = 0.4229215
    expect(wallFactor(0.3, "faxen")).toBeCloseTo(0.4229215, 7);
  });

  it("Haberman & Sayre (1958): (1 − 2.1050λ + 2.0865λ³ − 1.7068λ⁵ + 0.72603λ⁶)/(1 − 0.75857λ⁵)", () => {
    // λ = 0.1: (1 − 0.2105 + 0.0020865 − 0.0000171 + 0.0000007)/(1 − 0.0000076) = 0.7915761
    expect(wallFactor(0.1, "haberman-sayre")).toBeCloseTo(0.7915761, 6);
    // λ = 0.5: (1 − 1.0525 + 0.2608125 − 0.0533375 + 0.0113442)/(1 − 0.0237053) = 0.1663192/0.9762947 = 0.170357
    expect(wallFactor(0.5, "haberman-sayre")).toBeCloseTo(0.170357, 5);
  });

  it("Francis (1933): ((1 − λ)/(1 − 0.475λ))⁴", () => {
    // λ = 0.1: (0.9/0.9525)⁴ = 0.944882⁴ = 0.797094
    expect(wallFactor(0.1, "francis")).toBeCloseTo(0.797094, 5);
    // λ = 0.5: (0.5/0.7625)⁴ = 0.655738⁴ = 0.184900
    expect(wallFactor(0.5, "francis")).toBeCloseTo(0.1849, 4);
  });

  it("agrees between models to first order at small λ (all start 1 − 2.10λ)", () => {
    for (const method of ["faxen", "haberman-sayre", "francis"] as const) {
      expect(wallFactor(0.01, method)).toBeCloseTo(1 - 0.021, 3);
    }
  });

  it("is 1 without correction and refuses a sphere that does not fit", () => {
    expect(wallFactor(0.4, "none")).toBe(1);
    expect(() => wallFactor(1, "francis")).toThrow(ReductionInputError);
  });
});
