/** Plain words for the trail's dotted action names (the course's audit log, a student's record); unknown ones are shown as they are. */
export const actionWords: Record<string, string> = {
  "access.denied": "was refused access",
  "course.invitation_sent": "sent an invitation",
  "course.invitation_accepted": "accepted an invitation",
  "course.member_role_changed": "changed a member's role",
  "course.member_moved": "moved a student to another cohort",
  "course.member_removed": "removed a member",
  "course.created": "created the course",
  "course.settings_changed": "changed the course settings",
  "lab.extension_set": "gave students a later due time",
  "lab.extension_removed": "removed an extension",
  "address.viewed": "saw a shipping address",
  "address.changed": "entered or changed a shipping address",
  "address.deleted": "deleted a shipping address",
  "address.exported": "downloaded a shipping address",
  "address.imported": "imported a shipping address",
  "member.record_viewed": "opened a student's record",
};
