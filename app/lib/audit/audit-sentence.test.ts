import { describe, expect, it } from "vitest";
import { auditSentence, type AuditEntry, type AuditNames } from "./audit-sentence";

const none: AuditNames = { lab: null, otherLab: null, part: null, kit: null, member: null, invitee: null, course: null, cohort: null };
const entry = (action: string, detail: Record<string, unknown> = {}, names: Partial<AuditNames> = {}): AuditEntry => ({
  action,
  actorName: "Test instructor",
  detail,
  names: { ...none, ...names },
});

describe("audit sentences", () => {
  it.each([
    [0, "0 criteria"],
    [1, "1 criterion"],
    [2, "2 criteria"],
  ])("counts a rubric's %i criteria in words that agree", (criteria, words) => {
    expect(auditSentence(entry("marking.rubric_saved", { criteria }, { lab: "Drag" }))).toBe(
      `Test instructor saved the rubric of “Drag” (${words}).`,
    );
  });

  it.each([
    [0, "0 students"],
    [1, "1 student"],
    [2, "2 students"],
  ])("counts %i students given an extension", (students, words) => {
    const membershipIds = Array.from({ length: students }, (_, index) => `id-${index}`);
    expect(auditSentence(entry("lab.extension_set", { membershipIds }, { lab: "Drag" }))).toBe(
      `Test instructor gave ${words} a later due time for “Drag”.`,
    );
  });

  it.each([
    [0, 1, "from 0 points to 1 point"],
    [1, 2, "from 1 point to 2 points"],
    [2, 0, "from 2 points to 0 points"],
  ])("says how an adjusted mark moved (%i to %i)", (fromTotal, toTotal, words) => {
    expect(
      auditSentence(entry("marking.mark_adjusted", { fromTotal, toTotal, reason: "Moderated" }, { member: "Ann", otherLab: "Drag" })),
    ).toBe(`Test instructor adjusted the mark of Ann for “Drag” ${words}, because “Moderated”.`);
  });

  it("names a kit's move in words, and reads an action without a sentence of its own (or unknown) without its code", () => {
    expect(auditSentence(entry("kit.moved", { from: "in_transit", to: "at_home" }, { kit: "K-07" }))).toBe(
      "Test instructor moved kit K-07 from in transit to at home.",
    );
    expect(auditSentence(entry("course.invitation_resent", {}, {}))).toBe("Test instructor sent someone their invitation again.");
    expect(auditSentence({ ...entry("something.new_code"), actorName: null })).toBe("Someone no longer in the course made a change.");
  });
});
