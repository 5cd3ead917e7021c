import { describe, expect, it } from "vitest";
import { reminderDays, returnSettingsInput } from "./return-settings-input";

describe("return settings input", () => {
  it("reads reminder days typed with commas, semicolons or spaces, in order and each once", () => {
    expect(reminderDays.parse("7, 1;14 7")).toEqual([1, 7, 14]);
    expect(reminderDays.parse("")).toEqual([]);
    expect(reminderDays.safeParse("1, 2.5").success).toBe(false);
    expect(reminderDays.safeParse("0").success).toBe(false);
  });

  it("takes an address with every field blank as none, and refuses a half-typed one", () => {
    const blankAddress = { name: "", line1: "", city: "", country: "" };
    expect(returnSettingsInput.parse({ kitReturnBy: "", kitReturnReminderDays: "1", returnAddress: blankAddress })).toEqual({
      kitReturnBy: null,
      kitReturnReminderDays: [1],
      returnAddress: null,
    });
    const half = returnSettingsInput.safeParse({
      kitReturnBy: "2027-05-28",
      kitReturnReminderDays: "1",
      returnAddress: { ...blankAddress, city: "Galway" },
    });
    expect(half.success).toBe(false);
    expect(half.error?.issues.map((issue) => issue.path.join("."))).toEqual([
      "returnAddress.name",
      "returnAddress.line1",
      "returnAddress.country",
    ]);
  });
});
