/** Where a point or row of the comparison links: the staff's page of that hand-in. */
export const handInHref = (courseId: string, labId: string, dropLogId: string) =>
  `/courses/${courseId}/labs/${labId}/hand-ins/${dropLogId}`;
