/**
 * One reading of typed numbers on every form: the decimal comma that spreadsheets copy in much of
 * Europe is a point on the course, comparison, lab and part forms alike (common practice: the comma
 * is the decimal sign in most of continental Europe's locales).
 */
import { describe, expect, it } from "vitest";
import { comparisonSettings } from "~/lib/comparison/comparison-settings";
import { courseInput } from "~/lib/courses/course-input";
import { labInputFor } from "~/lib/labs/lab-input";
import { parseTypedNumber } from "./typed-number";

describe("parseTypedNumber", () => {
  it.each([
    ["4.32", 4.32],
    ["4,32", 4.32],
    [" 0,05 ", 0.05],
    ["-1,5", -1.5],
    [".5", 0.5],
    ["1e-3", 0.001],
  ])("reads %j as %d", (typed, value) => expect(parseTypedNumber(typed)).toBe(value));

  it("takes blank as not given and refuses what is not one number", () => {
    expect(parseTypedNumber("  ")).toBeUndefined();
    // A thousands separator or two numbers is a slip to name at the field, never a silent reading.
    for (const typed of ["1,234.5", "1,2,3", "4.32 s", "abc"]) expect(parseTypedNumber(typed)).toBeNaN();
  });
});

describe("the comma on every form", () => {
  it("course gravity, the comparison's α and the lab's resolutions read a decimal comma", () => {
    const course = courseInput.safeParse({
      title: "Fluids lab",
      code: "ME 2140",
      term: "2027 Spring",
      timeZone: "Europe/Dublin",
      localGravity: "9,81",
    });
    expect(course.success && course.data.localGravity).toBe(9.81);
    const settings = comparisonSettings.safeParse({ method: "grubbs", alpha: "0,05", maxOutliers: "2", k: "1,5" });
    expect(settings.success && settings.data).toMatchObject({ alpha: 0.05, k: 1.5 });
    const resolution = labInputFor("Europe/Dublin").shape.resolutions.safeParse({
      diameterMm: "0,01",
      massG: "0,001",
      distanceMm: "1",
      timeS: "0,01",
      temperatureC: "0,1",
      thermometerAccuracyC: "0,5",
    });
    expect(resolution.success && resolution.data).toEqual({
      diameterMm: 0.01,
      massG: 0.001,
      distanceMm: 1,
      timeS: 0.01,
      temperatureC: 0.1,
      thermometerAccuracyC: 0.5,
    });
  });

  it("a blank number is named at its field instead of read as 0", () => {
    const settings = comparisonSettings.safeParse({ method: "grubbs", alpha: "", maxOutliers: "2", k: "1.5" });
    expect(settings.success).toBe(false);
    expect(settings.error?.issues).toEqual([expect.objectContaining({ path: ["alpha"], message: "Enter a significance level." })]);
  });
});
