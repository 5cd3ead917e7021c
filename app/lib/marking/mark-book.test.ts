import { describe, expect, it } from "vitest";
import { formatPercent, markBookSettingsInput } from "./mark-book";

const labId = "6f1c2b9e-0d4a-4e3b-9a57-2c8d1e0f4a11";

describe("the mark book's settings form", () => {
  it("reads weights with a decimal comma or point, and a whole number of labs to drop", () => {
    const parsed = markBookSettingsInput.parse({ dropLowest: "1", labs: [{ labId, weight: "2,5" }] });
    expect(parsed).toEqual({ dropLowest: 1, labs: [{ labId, weight: 2.5 }] });
    expect(markBookSettingsInput.parse({ dropLowest: "0", labs: [{ labId, weight: "0" }] }).labs[0].weight).toBe(0);
  });

  it("refuses a negative weight, a fraction of a lab and a blank, naming each", () => {
    const result = markBookSettingsInput.safeParse({
      dropLowest: "1.5",
      labs: [
        { labId, weight: "-1" },
        { labId, weight: "" },
      ],
    });
    expect(result.success).toBe(false);
    const messages = Object.fromEntries(result.error!.issues.map((issue) => [issue.path.join("."), issue.message]));
    expect(messages).toEqual({
      dropLowest: "Give the number of lowest labs to drop as a whole number, e.g. 0 or 1.",
      "labs.0.weight": "A weight cannot be negative; 0 leaves the lab out.",
      "labs.1.weight": "Give the weight as a number, e.g. 1 or 0.5; 0 leaves the lab out.",
    });
  });

  it("prints percentages with one decimal, and a dash for none", () => {
    expect(formatPercent(78.3333)).toBe("78.3 %");
    expect(formatPercent(null)).toBe("—");
  });
});
