/**
 * Roster rows from a CSV file, what each would do to the course, and every problem each row has. A row
 * is matched by e-mail against the course's members and open invitations: it is new (an invitation is
 * sent), unchanged, or updated (name, cohort, student number). The same checks run in the browser for
 * the preview and on the server before the import is written, so the preview never promises what the
 * server then refuses.
 */
import { z } from "zod";
import { studentNumber } from "./student-number";

export const rosterColumns = ["email", "name", "cohort", "role", "student_number"] as const;

export const rosterTemplateCsv = [
  rosterColumns.join(","),
  "ada.student@example.edu,Ada Student,Tuesday bench,student,20261234",
  "sam.assistant@example.edu,Sam Assistant,,ta,",
].join("\r\n");

/** The headers a student number column is read from (lower-cased), as spreadsheets from registries tend to name it. */
const studentNumberHeaders = ["student_number", "student number", "student no", "student id", "id number"];

/** `role` is as written in the file (lower-cased, empty meaning student), so a typo can be shown. */
export type RosterRow = { line: number; email: string; name: string; cohort: string; role: string; studentNumber: string };

const roleWords: Record<string, "student" | "ta"> = { "": "student", student: "student", ta: "ta", "teaching assistant": "ta" };
const roleNames = { instructor: "an instructor", ta: "a TA", student: "a student" } as const;

export function rosterRole(row: RosterRow): "student" | "ta" | undefined {
  return roleWords[row.role];
}

/**
 * Someone the course already has at an address: a member (`id` is the membership) or an invitation not
 * yet accepted (`id` is the invitation). `cohortNames`: a student's or invitation's cohort, or the cohorts a TA marks.
 */
export type RosterPerson = {
  kind: "member" | "invitation";
  id: string;
  email: string;
  name: string | null;
  role: "instructor" | "ta" | "student";
  cohortNames: string[];
  studentNumber: string | null;
};

export type RosterCourse = { cohortNames: string[]; people: RosterPerson[] };

export type RosterChange = { field: "name" | "cohort" | "student number"; from: string | null; to: string };

/**
 * What committing a row does: `new` invites, `updated` changes the person's `changes`, `unchanged` does
 * nothing, and a row with `problems` is left out. `match` is the person the row's address found.
 */
export type RosterRowCheck = {
  row: RosterRow;
  status: "new" | "unchanged" | "updated" | "problem";
  match: RosterPerson | null;
  changes: RosterChange[];
  problems: string[];
};

const email = z.email();

/** Maps parsed CSV records (header names folded to lower case) to roster rows, numbering lines as a spreadsheet does. */
export function rosterRowsFromRecords(records: Record<string, string | undefined>[]): RosterRow[] {
  return records.map((record, index) => {
    const field = (...names: string[]) => {
      const name = names.find((candidate) => record[candidate] !== undefined || record[candidate.toUpperCase()] !== undefined);
      return name ? (record[name] ?? record[name.toUpperCase()] ?? "").trim() : "";
    };
    return {
      line: index + 2,
      email: field("email").toLowerCase(),
      name: field("name"),
      cohort: field("cohort"),
      role: field("role").toLowerCase(),
      studentNumber: field(...studentNumberHeaders),
    };
  });
}

/** The changes a row makes to the person it matched; an empty name or student number keeps the current one. */
function changesOf(row: RosterRow, person: RosterPerson, cohortName: string | undefined, problems: string[]): RosterChange[] {
  const changes: RosterChange[] = [];
  if (row.name && row.name !== person.name) changes.push({ field: "name", from: person.name, to: row.name });
  const current = person.cohortNames.map((name) => name.toLowerCase());
  if (cohortName && !current.includes(cohortName.toLowerCase())) {
    if (person.kind === "member" && person.role === "ta")
      problems.push(
        `Marks ${person.cohortNames.join(", ") || "no cohort"}: an import does not change the cohorts a TA marks (do that in Settings).`,
      );
    else changes.push({ field: "cohort", from: person.cohortNames[0] ?? null, to: cohortName });
  }
  if (row.studentNumber && row.studentNumber !== person.studentNumber)
    changes.push({ field: "student number", from: person.studentNumber, to: row.studentNumber });
  return changes;
}

export function checkRosterRows(rows: RosterRow[], course: RosterCourse): RosterRowCheck[] {
  const cohorts = new Map(course.cohortNames.map((name) => [name.toLowerCase(), name]));
  const people = new Map(course.people.map((person) => [person.email, person]));
  const firstLine = new Map<string, number>();
  const firstNumberLine = new Map<string, number>();
  for (const row of rows) {
    if (row.email && !firstLine.has(row.email)) firstLine.set(row.email, row.line);
    if (row.studentNumber && !firstNumberLine.has(row.studentNumber)) firstNumberLine.set(row.studentNumber, row.line);
  }

  return rows.map((row) => {
    const problems: string[] = [];
    let match: RosterPerson | null = null;
    if (!row.email) problems.push("The e-mail address is missing.");
    else if (!email.safeParse(row.email).success) problems.push(`“${row.email}” is not an e-mail address.`);
    else if (firstLine.get(row.email) !== row.line) problems.push(`The same address is on line ${firstLine.get(row.email)}.`);
    else match = people.get(row.email) ?? null;
    const role = rosterRole(row);
    if (!role) problems.push(`The role “${row.role}” is neither student nor ta.`);
    if (role === "student" && !row.cohort) problems.push("Give the student's cohort.");
    const cohortName = row.cohort ? cohorts.get(row.cohort.toLowerCase()) : undefined;
    if (row.cohort && !cohortName) problems.push(`There is no cohort called “${row.cohort}”.`);
    if (row.name.length > 120) problems.push("The name is longer than 120 characters.");
    if (row.studentNumber) {
      const number = studentNumber.safeParse(row.studentNumber);
      if (!number.success) problems.push(number.error.issues[0].message);
      else if (firstNumberLine.get(row.studentNumber) !== row.line)
        problems.push(`The same student number is on line ${firstNumberLine.get(row.studentNumber)}.`);
    }
    // Roles change on the member page, where its consequences (cohorts, API tokens) are shown; never by a file.
    if (match && role && match.role !== role)
      problems.push(
        match.kind === "member"
          ? `Already ${roleNames[match.role]} in this course: an import does not change roles (do that on the member page).`
          : `Invited as ${roleNames[match.role]}: an import does not change roles (withdraw the invitation on the members page and invite again).`,
      );
    const changes = match ? changesOf(row, match, cohortName, problems) : [];
    const status = problems.length ? "problem" : !match ? "new" : changes.length ? "updated" : "unchanged";
    return { row, status, match, changes: problems.length ? [] : changes, problems };
  });
}

/** What the browser posts to commit an import: the rows it previewed, checked again by the server. */
export const rosterCommitInput = z
  .array(
    z.object({
      line: z.number().int().positive(),
      email: z.string(),
      name: z.string(),
      cohort: z.string(),
      role: z.string(),
      studentNumber: z.string(),
    }),
  )
  .min(1, "The file has no rows to import.")
  .max(10_000, "Import at most 10,000 people at a time.");

/** The key the browser gives each preview: committing it twice imports once. */
export const rosterImportKey = z.string().trim().min(8, "The import key is missing; read the file again.").max(200);
