import { describe, expect, it } from "vitest";
import { formatWithUncertainty, roundToUncertainty } from "./round-to-uncertainty";

describe("roundToUncertainty (GUM, JCGM 100:2008, 7.2.6)", () => {
  it("rounds y = 10.057 62 Ω with u_c = 27 mΩ to 10.058 Ω, GUM 7.2.6's own example", () => {
    expect(roundToUncertainty(10.05762, 0.027)).toEqual({ value: "10.058", uncertainty: "0.027" });
  });

  it("rounds u = 28.05 kHz down to 28 kHz, as GUM 7.2.6's common-sense example does", () => {
    expect(roundToUncertainty(1000.123, 28.05)).toEqual({ value: "1000", uncertainty: "28" });
  });

  it("keeps two significant digits when the uncertainty rounds up to the next power of ten", () => {
    // 0.0996 → 0.10, so the value keeps two decimals, not three (common practice).
    expect(roundToUncertainty(1.23456, 0.0996)).toEqual({ value: "1.23", uncertainty: "0.10" });
  });

  it("rounds to whole tens when the uncertainty is in the hundreds", () => {
    expect(roundToUncertainty(123456, 347)).toEqual({ value: "123460", uncertainty: "350" });
  });

  it("gives nothing for an uncertainty that is zero, negative or not finite", () => {
    expect(roundToUncertainty(1, 0)).toBeNull();
    expect(roundToUncertainty(1, -0.1)).toBeNull();
    expect(roundToUncertainty(1, Number.NaN)).toBeNull();
  });

  it("writes value ± U, or four figures when U is unknown", () => {
    expect(formatWithUncertainty(1088.5204, 26.06)).toBe("1089 ± 26");
    expect(formatWithUncertainty(1.2345678, null)).toBe("1.235");
  });
});
