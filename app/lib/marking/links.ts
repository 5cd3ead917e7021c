/** Where a student reads their released mark: the lab's own page, at its mark section. E-mails link here. */
export const studentMarkHref = (courseId: string, labId: string) => `/courses/${courseId}/labs/${labId}#mark`;

/** The marking desk of a lab; its per-student view posts its saves here. */
export const markingDeskHref = (courseId: string, labId: string) => `/courses/${courseId}/labs/${labId}/marking`;

/**
 * One student's marking view, built around their hand-in. `search` is the desk's own search string
 * (its order and filters), carried along so that moving between students follows the desk's order.
 */
export const markingStudentHref = (courseId: string, labId: string, membershipId: string, search = "") =>
  `${markingDeskHref(courseId, labId)}/students/${membershipId}${search && !search.startsWith("?") ? `?${search}` : search}`;
