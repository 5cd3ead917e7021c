import { describe, expect, it } from "vitest";
import { rosterCommitLabel, rosterImportedSentence } from "./roster-words";

describe("the roster import's words", () => {
  it("labels the commit button at 0, 1 and 2", () => {
    expect([0, 1, 2].map((n) => rosterCommitLabel(n, 0))).toEqual([
      "Import 0 people and send their invitations",
      "Import 1 person and send the invitation",
      "Import 2 people and send their invitations",
    ]);
    expect([1, 2].map((n) => rosterCommitLabel(0, n))).toEqual(["Update 1 person", "Update 2 people"]);
    expect([0, 1, 2].map((n) => rosterCommitLabel(n, 1))).toEqual([
      "Update 1 person",
      "Import 2 people: send 1 invitation and update 1",
      "Import 3 people: send 2 invitations and update 1",
    ]);
  });

  it("says what an import did at 0, 1 and 2", () => {
    const none = { invited: 0, students: 0, tas: 0, updated: 0, unchanged: 0 };
    expect(rosterImportedSentence(none)).toBe("Imported: nothing to change.");
    expect(rosterImportedSentence({ ...none, invited: 1, students: 1 })).toBe("Imported: 1 invitation sent (1 student, 0 TAs).");
    expect(rosterImportedSentence({ ...none, invited: 2, students: 1, tas: 1 })).toBe("Imported: 2 invitations sent (1 student, 1 TA).");
    expect(rosterImportedSentence({ ...none, invited: 2, students: 2, updated: 1, unchanged: 2 })).toBe(
      "Imported: 2 invitations sent (2 students, 0 TAs); 1 person updated; 2 unchanged.",
    );
    expect(rosterImportedSentence({ ...none, updated: 2 })).toBe("Imported: 2 people updated.");
  });
});
