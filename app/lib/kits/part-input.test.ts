import { describe, expect, it } from "vitest";
import { partInput } from "./part-input";

const sphere = { kind: "sphere", label: "S-12", material: "steel", massG: "2.04" };

describe("partInput", () => {
  it("reads a diameter typed with a decimal comma as with a point", () => {
    const withComma = partInput.parse({ ...sphere, diameterMm: "7,94", diameterResolutionMm: "0,01" });
    expect(withComma).toMatchObject({ diameterMm: 7.94, diameterResolutionMm: 0.01 });
    expect(partInput.parse({ ...sphere, diameterMm: "7.94" })).toMatchObject({ diameterMm: 7.94 });
  });

  it("names the field of a number it cannot read, and reads an empty box as missing rather than zero", () => {
    const garbled = partInput.safeParse({ ...sphere, diameterMm: "7,9,4" });
    expect(garbled.error?.issues).toMatchObject([{ path: ["diameterMm"], message: "Enter the diameter in mm." }]);
    const empty = partInput.safeParse({ ...sphere, diameterMm: "" });
    expect(empty.error?.issues).toMatchObject([{ path: ["diameterMm"], message: "Enter the diameter in mm." }]);
  });
});
