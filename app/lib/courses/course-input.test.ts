import { describe, expect, it } from "vitest";
import { courseInput } from "./course-input";

const course = { title: "Fluids at Home", code: "ME 2140", term: "2027 Spring", timeZone: "Europe/Dublin", localGravity: "" };

describe("course input", () => {
  it("takes the bias test's α from the form's choices and defaults to 0.05", () => {
    expect(courseInput.parse({ ...course, partBiasAlpha: "0.1" }).partBiasAlpha).toBe(0.1);
    expect(courseInput.parse(course).partBiasAlpha).toBe(0.05);
    const refused = courseInput.safeParse({ ...course, partBiasAlpha: "0.2" });
    expect(refused.success).toBe(false);
    expect(refused.error?.issues[0]).toMatchObject({ path: ["partBiasAlpha"], message: "Choose 0.01, 0.05 or 0.10." });
  });

  it("keeps local gravity within what Earth's surface allows, or none", () => {
    expect(courseInput.parse(course).localGravity).toBeNull();
    expect(courseInput.parse({ ...course, localGravity: "9.81" }).localGravity).toBe(9.81);
    expect(courseInput.safeParse({ ...course, localGravity: "10" }).success).toBe(false);
  });

  it("refuses a time zone the runtime does not know", () => {
    expect(courseInput.safeParse({ ...course, timeZone: "Europe/Atlantis" }).success).toBe(false);
  });
});
