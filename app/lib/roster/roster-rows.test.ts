import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { checkRosterRows, rosterRowsFromRecords, rosterTemplateCsv } from "./roster-rows";

const course = { cohortNames: ["Tuesday bench", "Wednesday bench"], memberEmails: ["already@uni.example"] };

function checksFor(csv: string) {
  const parsed = Papa.parse<Record<string, string>>(csv, {
    header: true,
    skipEmptyLines: "greedy",
    transformHeader: (h) => h.trim().toLowerCase(),
  });
  return checkRosterRows(rosterRowsFromRecords(parsed.data), course);
}

describe("roster rows", () => {
  it("flags every kind of bad row, at its spreadsheet line", () => {
    const checks = checksFor(
      [
        "Email,Name,Cohort,Role",
        "ok@uni.example,Ok Person,Tuesday bench,student",
        ",No Address,Tuesday bench,",
        "not-an-address,Bad Address,Tuesday bench,student",
        "ok@uni.example,Twice,Tuesday bench,student",
        "already@uni.example,Member,Tuesday bench,student",
        "nocohort@uni.example,No Cohort,,student",
        "typo@uni.example,Typo,Friday bench,student",
        "role@uni.example,Odd Role,Tuesday bench,professor",
        "ta@uni.example,A TA,,ta",
      ].join("\n"),
    );
    const problems = Object.fromEntries(checks.map((check) => [check.row.line, check.problems.join(" ")]));
    expect(problems).toEqual({
      2: "",
      3: "The e-mail address is missing.",
      4: "“not-an-address” is not an e-mail address.",
      5: "The same address is on line 2.",
      6: "Already a member of this course.",
      7: "Give the student's cohort.",
      8: "There is no cohort called “Friday bench”.",
      9: "The role “professor” is neither student nor ta.",
      10: "",
    });
  });

  it("reads e-mail addresses case-insensitively and cohorts whatever their case", () => {
    const [check] = checksFor("email,name,cohort\nALREADY@Uni.Example,Someone,tuesday BENCH");
    expect(check.row.email).toBe("already@uni.example");
    expect(check.problems).toEqual(["Already a member of this course."]);
  });

  it("offers a template whose rows pass the checks of a course with that cohort", () => {
    const parsed = Papa.parse<Record<string, string>>(rosterTemplateCsv, { header: true });
    const checks = checkRosterRows(rosterRowsFromRecords(parsed.data), { cohortNames: ["Tuesday bench"], memberEmails: [] });
    expect(checks.flatMap((check) => check.problems)).toEqual([]);
  });
});
