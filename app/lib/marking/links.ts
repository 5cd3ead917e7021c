/** Where a student reads their released mark: the lab's own page, at its mark section. E-mails link here. */
export const studentMarkHref = (courseId: string, labId: string) => `/courses/${courseId}/labs/${labId}#mark`;
