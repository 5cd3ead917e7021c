/** Where a point or row of the comparison links: the hand-in's row in the lab's comparison table. */
export const handInHref = (courseId: string, labId: string, dropLogId: string) => `/courses/${courseId}/labs/${labId}/comparison#drop-log-${dropLogId}`;
