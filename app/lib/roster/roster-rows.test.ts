import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { checkRosterRows, rosterRowsFromRecords, rosterTemplateCsv, type RosterCourse, type RosterPerson } from "./roster-rows";

const person = (email: string, fields: Partial<RosterPerson> = {}): RosterPerson => ({
  kind: "member",
  id: `id-of-${email}`,
  email,
  name: "Same Name",
  role: "student",
  cohortNames: ["Tuesday bench"],
  studentNumber: null,
  ...fields,
});

const course: RosterCourse = {
  cohortNames: ["Tuesday bench", "Wednesday bench"],
  people: [
    person("already@uni.example"),
    person("numbered@uni.example", { studentNumber: "S-100" }),
    person("invited@uni.example", { kind: "invitation", name: null }),
    person("marker@uni.example", { role: "ta", cohortNames: ["Tuesday bench"] }),
    person("boss@uni.example", { role: "instructor", cohortNames: [] }),
  ],
};

function checksFor(csv: string, of: RosterCourse = course) {
  const parsed = Papa.parse<Record<string, string>>(csv, {
    header: true,
    skipEmptyLines: "greedy",
    transformHeader: (h) => h.trim().toLowerCase(),
  });
  return checkRosterRows(rosterRowsFromRecords(parsed.data), of);
}

const byLine = (checks: ReturnType<typeof checksFor>) =>
  Object.fromEntries(checks.map((check) => [check.row.line, { status: check.status, problems: check.problems.join(" ") }]));

describe("roster rows", () => {
  it("flags every kind of bad row, at its spreadsheet line", () => {
    const checks = checksFor(
      [
        "Email,Name,Cohort,Role,Student Number",
        "ok@uni.example,Ok Person,Tuesday bench,student,",
        ",No Address,Tuesday bench,,",
        "not-an-address,Bad Address,Tuesday bench,student,",
        "ok@uni.example,Twice,Tuesday bench,student,",
        "nocohort@uni.example,No Cohort,,student,",
        "typo@uni.example,Typo,Friday bench,student,",
        "role@uni.example,Odd Role,Tuesday bench,professor,",
        "ta@uni.example,A TA,,ta,",
        'badnumber@uni.example,Bad Number,Tuesday bench,student,"12,34"',
        "first.number@uni.example,First,Tuesday bench,student,S-7",
        "second.number@uni.example,Second,Tuesday bench,student,S-7",
      ].join("\n"),
    );
    expect(byLine(checks)).toEqual({
      2: { status: "new", problems: "" },
      3: { status: "problem", problems: "The e-mail address is missing." },
      4: { status: "problem", problems: "“not-an-address” is not an e-mail address." },
      5: { status: "problem", problems: "The same address is on line 2." },
      6: { status: "problem", problems: "Give the student's cohort." },
      7: { status: "problem", problems: "There is no cohort called “Friday bench”." },
      8: { status: "problem", problems: "The role “professor” is neither student nor ta." },
      9: { status: "new", problems: "" },
      10: { status: "problem", problems: "A student number has letters and digits, with spaces, dots, hyphens or slashes between them." },
      11: { status: "new", problems: "" },
      12: { status: "problem", problems: "The same student number is on line 11." },
    });
  });

  it("tells new, unchanged and updated rows apart by e-mail, against members and open invitations", () => {
    const checks = checksFor(
      [
        "email,name,cohort,student_number",
        "fresh@uni.example,Fresh Person,Tuesday bench,S-1",
        "already@uni.example,Same Name,tuesday BENCH,",
        "already@uni.example,,Tuesday bench,",
        "numbered@uni.example,,Tuesday bench,S-100",
        "invited@uni.example,Now Named,Wednesday bench,S-2",
      ].join("\n"),
    );
    expect(checks.map((check) => check.status)).toEqual(["new", "unchanged", "problem", "unchanged", "updated"]);
    expect(checks[0].match).toBeNull();
    expect(checks[1].match?.id).toBe("id-of-already@uni.example");
    expect(checks[4]).toMatchObject({
      match: { kind: "invitation", id: "id-of-invited@uni.example" },
      changes: [
        { field: "name", from: null, to: "Now Named" },
        { field: "cohort", from: "Tuesday bench", to: "Wednesday bench" },
        { field: "student number", from: null, to: "S-2" },
      ],
    });
  });

  it("says what an update changes, keeping what an empty cell leaves out", () => {
    const [moved, renumbered] = checksFor(
      ["email,name,cohort,id number", "already@uni.example,,Wednesday bench,", "numbered@uni.example,New Name,Tuesday bench,S-101"].join(
        "\n",
      ),
    );
    expect(moved).toMatchObject({ status: "updated", changes: [{ field: "cohort", from: "Tuesday bench", to: "Wednesday bench" }] });
    expect(renumbered).toMatchObject({
      status: "updated",
      changes: [
        { field: "name", from: "Same Name", to: "New Name" },
        { field: "student number", from: "S-100", to: "S-101" },
      ],
    });
  });

  it("refuses to change a role or the cohorts a TA marks, and changes nothing else on that row", () => {
    const checks = checksFor(
      [
        "email,name,cohort,role",
        "already@uni.example,Renamed,Tuesday bench,ta",
        "invited@uni.example,,Tuesday bench,ta",
        "boss@uni.example,,Tuesday bench,student",
        "marker@uni.example,,Wednesday bench,ta",
        "marker@uni.example,,,ta",
      ].join("\n"),
    );
    expect(byLine(checks)).toEqual({
      2: {
        status: "problem",
        problems: "Already a student in this course: an import does not change roles (do that on the member page).",
      },
      3: {
        status: "problem",
        problems: "Invited as a student: an import does not change roles (withdraw the invitation on the members page and invite again).",
      },
      4: {
        status: "problem",
        problems: "Already an instructor in this course: an import does not change roles (do that on the member page).",
      },
      5: {
        status: "problem",
        problems: "Marks Tuesday bench: an import does not change the cohorts a TA marks (do that in Settings).",
      },
      6: { status: "problem", problems: "The same address is on line 5." },
    });
    expect(checks[0].changes).toEqual([]);
  });

  it("reads e-mail addresses case-insensitively and cohorts whatever their case", () => {
    const [check] = checksFor("email,name,cohort\nALREADY@Uni.Example,Same Name,tuesday BENCH");
    expect(check.row.email).toBe("already@uni.example");
    expect(check.status).toBe("unchanged");
  });

  it("offers a template whose rows pass the checks of a course with that cohort", () => {
    const parsed = Papa.parse<Record<string, string>>(rosterTemplateCsv, { header: true });
    const checks = checkRosterRows(rosterRowsFromRecords(parsed.data), { cohortNames: ["Tuesday bench"], people: [] });
    expect(checks.map((check) => [check.status, check.row.studentNumber])).toEqual([
      ["new", "20261234"],
      ["new", ""],
    ]);
  });
});
