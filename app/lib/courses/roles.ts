/** A member's role in a course, in the words every page uses. */
export const courseRoles = ["student", "ta", "instructor"] as const;
export type CourseRoleName = (typeof courseRoles)[number];
export const roleWords: Record<CourseRoleName, string> = { instructor: "Instructor", ta: "Teaching assistant", student: "Student" };
