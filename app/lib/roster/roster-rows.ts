/**
 * Roster rows from a CSV file, and every problem each row has. The same checks run in the browser for
 * the preview and on the server before the import is written, so the preview never promises what the
 * server then refuses.
 */
import { z } from "zod";

export const rosterColumns = ["email", "name", "cohort", "role"] as const;

export const rosterTemplateCsv = [
  rosterColumns.join(","),
  "ada.student@example.edu,Ada Student,Tuesday bench,student",
  "sam.assistant@example.edu,Sam Assistant,,ta",
].join("\r\n");

/** `role` is as written in the file (lower-cased, empty meaning student), so a typo can be shown. */
export type RosterRow = { line: number; email: string; name: string; cohort: string; role: string };

const roleWords: Record<string, "student" | "ta"> = { "": "student", student: "student", ta: "ta", "teaching assistant": "ta" };

export function rosterRole(row: RosterRow): "student" | "ta" | undefined {
  return roleWords[row.role];
}
export type RosterRowCheck = { row: RosterRow; problems: string[] };

const email = z.email();

/** Maps parsed CSV records (header names folded to lower case) to roster rows, numbering lines as a spreadsheet does. */
export function rosterRowsFromRecords(records: Record<string, string | undefined>[]): RosterRow[] {
  return records.map((record, index) => {
    const field = (name: string) => (record[name] ?? record[name.toUpperCase()] ?? "").trim();
    return {
      line: index + 2,
      email: field("email").toLowerCase(),
      name: field("name"),
      cohort: field("cohort"),
      role: field("role").toLowerCase(),
    };
  });
}

export function checkRosterRows(rows: RosterRow[], course: { cohortNames: string[]; memberEmails: Iterable<string> }): RosterRowCheck[] {
  const cohorts = new Set(course.cohortNames.map((name) => name.toLowerCase()));
  const members = new Set(course.memberEmails);
  const firstLine = new Map<string, number>();
  for (const row of rows) if (row.email && !firstLine.has(row.email)) firstLine.set(row.email, row.line);

  return rows.map((row) => {
    const problems: string[] = [];
    if (!row.email) problems.push("The e-mail address is missing.");
    else if (!email.safeParse(row.email).success) problems.push(`“${row.email}” is not an e-mail address.`);
    else if (firstLine.get(row.email) !== row.line) problems.push(`The same address is on line ${firstLine.get(row.email)}.`);
    else if (members.has(row.email)) problems.push("Already a member of this course.");
    const role = rosterRole(row);
    if (!role) problems.push(`The role “${row.role}” is neither student nor ta.`);
    if (role === "student" && !row.cohort) problems.push("Give the student's cohort.");
    if (row.cohort && !cohorts.has(row.cohort.toLowerCase())) problems.push(`There is no cohort called “${row.cohort}”.`);
    if (row.name.length > 120) problems.push("The name is longer than 120 characters.");
    return { row, problems };
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
    }),
  )
  .min(1, "The file has no rows to import.")
  .max(10_000, "Import at most 10,000 people at a time.");

/** The key the browser gives each preview: committing it twice imports once. */
export const rosterImportKey = z.string().trim().min(8, "The import key is missing; read the file again.").max(200);
