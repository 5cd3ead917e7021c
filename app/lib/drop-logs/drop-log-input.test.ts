import { describe, expect, it } from "vitest";
import { parseTypedNumber } from "~/lib/forms/typed-number";
import { dropLogInput } from "./drop-log-input";
import { effectiveHandInWindow, handInTiming } from "./hand-in-window";

describe("typed numbers", () => {
  it("reads a decimal comma as a point, blank as not given, and words as not a number", () => {
    expect(parseTypedNumber("4,32")).toBe(4.32);
    expect(parseTypedNumber(" 7.5 ")).toBe(7.5);
    expect(parseTypedNumber("")).toBeUndefined();
    expect(parseTypedNumber("4.3.2")).toBeNaN();
    expect(parseTypedNumber("1,234,5")).toBeNaN();
  });
});

describe("dropLogInput", () => {
  const base = { sphereId: "0b5f8b1e-7a51-4d2c-9a55-4f8a2a3c9d10", temperatureC: "21.5" };

  it("gives one message per bad drop row, at that row", () => {
    const result = dropLogInput.safeParse({ ...base, drops: ["4.1", "", "x", "-3", "0.01", "601"] });
    expect(result.success).toBe(false);
    const messages = Object.fromEntries(result.error!.issues.map((issue) => [issue.path.join("."), issue.message]));
    expect(Object.keys(messages)).toEqual(["drops.1", "drops.2", "drops.3", "drops.4", "drops.5"]);
    expect(messages["drops.1"]).toMatch(/remove this row/);
    expect(messages["drops.3"]).toBe("A time cannot be negative.");
  });

  it("keeps the student's own measurements optional", () => {
    const result = dropLogInput.parse({ ...base, ownDiameterMm: "", drops: ["4,1"] });
    expect(result).toEqual({ sphereId: base.sphereId, temperatureC: 21.5, drops: [4.1] });
  });
});

describe("the fluid lot and column a drop log names", () => {
  const base = { sphereId: "0b5f8b1e-7a51-4d2c-9a55-4f8a2a3c9d10", temperatureC: "21.5", drops: ["4.1"] };
  const lotId = "6f1c2d3e-4b5a-4c6d-8e7f-901234567890";

  it("keeps a named lot, and reads a blank choice (the form's single lot left out) as none", () => {
    expect(dropLogInput.parse({ ...base, fluidLotId: lotId, columnId: "" })).toMatchObject({ fluidLotId: lotId, columnId: undefined });
    expect(dropLogInput.parse(base).fluidLotId).toBeUndefined();
  });

  it("says at the field when the choice is not an id", () => {
    const result = dropLogInput.safeParse({ ...base, fluidLotId: "GLY-95A" });
    expect(result.error?.issues.map((issue) => [issue.path.join("."), issue.message])).toEqual([
      ["fluidLotId", "Choose the fluid lot you used from your kit."],
    ]);
  });
});

describe("handInTiming", () => {
  const window = { opensAt: new Date("2027-03-21T09:00:00Z"), dueAt: new Date("2027-03-28T22:59:00Z"), lateCutoffAt: null };
  it("counts the due instant itself as on time, and refuses after it without a cut-off", () => {
    expect(handInTiming(window, new Date("2027-03-28T22:59:00Z"))).toBe("on-time");
    expect(handInTiming(window, new Date("2027-03-28T22:59:01Z"))).toBe("closed");
    expect(handInTiming(window, new Date("2027-03-21T08:59:59Z"))).toBe("not-open");
  });
});

describe("effectiveHandInWindow", () => {
  const lab = { opensAt: new Date("2027-03-21T09:00:00Z"), dueAt: new Date("2027-03-28T22:59:00Z"), lateCutoffAt: null };
  const cohort = { dueAt: new Date("2027-03-30T22:59:00Z"), lateCutoffAt: new Date("2027-04-01T22:59:00Z") };
  const student = { dueAt: new Date("2027-04-04T21:59:00Z"), lateCutoffAt: null };

  it("keeps the lab's times without an extension", () => {
    expect(effectiveHandInWindow(lab, {})).toEqual({ ...lab, extendedBy: null });
  });
  it("prefers the student's own extension over the cohort's", () => {
    const window = effectiveHandInWindow(lab, { student, cohort });
    expect(window.extendedBy).toBe("student");
    expect(handInTiming(window, new Date("2027-04-01T12:00:00Z"))).toBe("on-time");
    expect(handInTiming(window, new Date("2027-04-04T22:00:00Z"))).toBe("closed");
  });
  it("keeps the class's later cut-off for an extension without one, and none when the class's comes first", () => {
    const classWithCutoff = { ...lab, lateCutoffAt: new Date("2027-04-06T22:59:00Z") };
    const extended = effectiveHandInWindow(classWithCutoff, { student });
    expect(extended.lateCutoffAt).toEqual(classWithCutoff.lateCutoffAt);
    expect(handInTiming(extended, new Date("2027-04-05T12:00:00Z"))).toBe("late");
    const pastTheClassCutoff = effectiveHandInWindow(classWithCutoff, {
      student: { dueAt: new Date("2027-04-08T21:59:00Z"), lateCutoffAt: null },
    });
    expect(pastTheClassCutoff.lateCutoffAt).toBeNull();
    // Its own cut-off wins, even one at the new due time itself.
    expect(effectiveHandInWindow(classWithCutoff, { student: { ...student, lateCutoffAt: student.dueAt } }).lateCutoffAt).toEqual(
      student.dueAt,
    );
  });
  it("uses the cohort's extension, late window included", () => {
    const window = effectiveHandInWindow(lab, { cohort, student: null });
    expect(window.extendedBy).toBe("cohort");
    expect(handInTiming(window, new Date("2027-03-31T08:00:00Z"))).toBe("late");
  });
});
