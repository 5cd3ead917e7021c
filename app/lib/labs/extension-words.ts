/** The extension notices' words, agreeing with the number of students extended. */
import { plural } from "../plural";

/** Whom a new due time now applies to, as a sentence's subject: "The student is", "3 students are". */
export function extendedWho(students: number): string {
  return plural(students, "The student is", `${students} students are`);
}

/** The students ticked on the dashboard, for its extend button: "Give these 3 students the new due time". */
export function selectedStudentsWords(selected: number): string {
  return selected === 0 ? "the selected students" : plural(selected, "this student", `these ${selected} students`);
}
