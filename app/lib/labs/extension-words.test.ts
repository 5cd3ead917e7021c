import { describe, expect, it } from "vitest";
import { extendedWho, selectedStudentsWords } from "./extension-words";

describe("the extension notices' words", () => {
  it("agree at 0, 1 and 2", () => {
    expect([0, 1, 2].map(extendedWho)).toEqual(["0 students are", "The student is", "2 students are"]);
    expect([0, 1, 2].map(selectedStudentsWords)).toEqual(["the selected students", "this student", "these 2 students"]);
  });
});
