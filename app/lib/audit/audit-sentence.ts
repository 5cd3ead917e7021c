/**
 * An audit event as a sentence for the course's audit log: who did what to which lab, part, kit or
 * student, by name. The names are read with the events (see `listCourseAudit`); the stored codes, ids
 * and details never reach the page, only the facts a sentence needs. Pure.
 */
import { kitStateLabels, type KitState } from "~/lib/kits/kit-states";
import { counted } from "~/lib/plural";
import { actionWords } from "./action-words";

/** The names of what an event is about, each null when the event names no such thing (or it is gone). */
export type AuditNames = {
  lab: string | null;
  /** A lab named in the detail (a mark's lab, a rubric's source). */
  otherLab: string | null;
  part: string | null;
  kit: string | null;
  member: string | null;
  invitee: string | null;
  course: string | null;
  cohort: string | null;
};

export type AuditEntry = { action: string; actorName: string | null; detail: Record<string, unknown>; names: AuditNames };

const quoted = (title: string | null, otherwise: string) => (title ? `“${title}”` : otherwise);
const numberOf = (detail: Record<string, unknown>, key: string) => (typeof detail[key] === "number" ? (detail[key] as number) : null);
const textOf = (detail: Record<string, unknown>, key: string) =>
  typeof detail[key] === "string" && detail[key] !== "" ? (detail[key] as string) : null;
const stateWords = (state: unknown) =>
  typeof state === "string" && state in kitStateLabels ? kitStateLabels[state as KitState].toLowerCase() : "another state";
const roleWords: Record<string, string> = { student: "a student", ta: "a TA", instructor: "an instructor" };

/** What the actor did, after their name, by action; an action without its own sentence reads through `actionWords`. */
const sentences: Record<string, (entry: AuditEntry) => string> = {
  "access.denied": ({ names }) => `was refused access${names.lab ? ` to ${quoted(names.lab, "")}` : ""}`,
  "course.created": () => "created the course",
  "course.settings_changed": () => "changed the course settings",
  "course.cohort_created": ({ names }) => `created the cohort ${quoted(names.cohort, "since removed")}`,
  "course.ta_cohorts_changed": ({ names, detail }) => {
    const cohorts = Array.isArray(detail.cohortIds) ? detail.cohortIds.length : 0;
    return `set ${names.member ?? "a former member"} to mark ${counted(cohorts, "cohort", "cohorts")}`;
  },
  "course.invitation_sent": ({ names, detail }) =>
    `invited ${names.invitee ?? textOf(detail, "email") ?? "someone"}${roleWords[String(detail.role)] ? ` as ${roleWords[String(detail.role)]}` : ""}`,
  "course.invitation_resent": ({ names, detail }) => `sent ${names.invitee ?? textOf(detail, "email") ?? "someone"} their invitation again`,
  "course.invitation_revoked": ({ names, detail }) => `withdrew the invitation of ${names.invitee ?? textOf(detail, "email") ?? "someone"}`,
  "course.invitation_accepted": () => "accepted an invitation and joined the course",
  "course.member_role_changed": ({ names, detail }) => {
    const who = names.member ?? "a former member";
    const cohort = names.cohort ? ` in the cohort ${quoted(names.cohort, "")}` : "";
    return detail.from === detail.to
      ? `moved ${who} to the cohort ${quoted(names.cohort, "since removed")}`
      : `made ${who} ${roleWords[String(detail.to)] ?? "a member of another role"}${cohort}`;
  },
  "course.member_updated": ({ names, detail }) =>
    `changed the details of ${names.member ?? names.invitee ?? textOf(detail, "email") ?? "a former member"}${detail.via === "roster import" ? " from a roster file" : ""}`,
  "course.member_removed": ({ names }) => `removed ${names.member ?? "a former member"} from the course`,
  "course.roster_updated": () => "updated the roster from a file",
  "course.carried_over": ({ names }) => `carried the course over, with ${quoted(names.course, "a course since deleted")} on the other side`,
  "course.archived": () => "archived the course",
  "course.restored": () => "restored the archived course",
  "course.message_sent": ({ detail }) => {
    const recipients = numberOf(detail, "recipientCount") ?? 0;
    const subject = textOf(detail, "subject");
    return `wrote to ${counted(recipients, "student", "students")}${subject ? `: “${subject}”` : ""}`;
  },
  "lab.created": ({ names, detail }) => `created the lab ${quoted(names.lab ?? textOf(detail, "title"), "since deleted")}`,
  "lab.updated": ({ names, detail }) => `changed the lab ${quoted(names.lab ?? textOf(detail, "title"), "since deleted")}`,
  "lab.published": ({ names, detail }) => `published the lab ${quoted(names.lab ?? textOf(detail, "title"), "since deleted")}`,
  "lab.closed": ({ names, detail }) => `closed the lab ${quoted(names.lab ?? textOf(detail, "title"), "since deleted")}`,
  "lab.comparison_method_changed": ({ names }) => `changed how ${quoted(names.lab, "a lab")} compares the class`,
  "lab.extension_set": ({ names, detail }) => {
    const students = Array.isArray(detail.membershipIds) ? detail.membershipIds.length : null;
    const who = students !== null ? counted(students, "student", "students") : `the cohort ${quoted(names.cohort, "since removed")}`;
    return `gave ${who} a later due time for ${quoted(names.lab, "a lab")}`;
  },
  "lab.extension_removed": ({ names }) => `removed an extension of ${quoted(names.lab, "a lab")}`,
  "marking.rubric_saved": ({ names, detail }) =>
    `saved the rubric of ${quoted(names.lab, "a lab")} (${counted(numberOf(detail, "criteria") ?? 0, "criterion", "criteria")})`,
  "marking.rubric_copied": ({ names, detail }) =>
    `copied the rubric of ${quoted(names.otherLab, "another lab")} into ${quoted(names.lab, "a lab")} (${counted(numberOf(detail, "criteria") ?? 0, "criterion", "criteria")})`,
  "marking.ready": ({ names }) => `closed the marking of ${quoted(names.lab, "a lab")} for TAs`,
  "marking.reopened": ({ names }) => `reopened the marking of ${quoted(names.lab, "a lab")}`,
  "marking.released": ({ names, detail }) =>
    `released the marks of ${quoted(names.lab, "a lab")} to ${counted(numberOf(detail, "released") ?? 0, "student", "students")}`,
  "marking.mark_adjusted": ({ names, detail }) => {
    const from = numberOf(detail, "fromTotal");
    const to = numberOf(detail, "toTotal");
    const reason = textOf(detail, "reason");
    return `adjusted the mark of ${names.member ?? "a former member"} for ${quoted(names.otherLab, "a lab")}${
      to !== null ? ` ${from !== null ? `from ${counted(from, "point", "points")} ` : ""}to ${counted(to, "point", "points")}` : ""
    }${reason ? `, because “${reason}”` : ""}`;
  },
  "markbook.settings_changed": () => "changed the mark book's weights",
  "markbook.exported": ({ detail }) => `downloaded the mark book (${counted(numberOf(detail, "students") ?? 0, "student", "students")})`,
  "part.created": ({ names, detail }) =>
    `recorded the part ${names.part ?? "since deleted"}${detail.source === "csv-import" ? " from a CSV import" : ""}`,
  "part.changed": ({ names, detail }) => {
    const part = names.part ?? "since deleted";
    if (detail.change === "remeasured") return `re-measured the part ${part}`;
    if (detail.change === "status:remeasure") return `sent the part ${part} for re-measurement`;
    if (detail.change === "status:retired") return `retired the part ${part}`;
    if (detail.change === "status:in_service") return `returned the part ${part} to service`;
    return `changed the part ${part}`;
  },
  "part.rereduction_queued": ({ names, detail }) =>
    `corrected the part ${names.part ?? textOf(detail, "partLabel") ?? "since deleted"}; the hand-ins that used it are reduced again`,
  "part.rereduced": ({ names, detail }) =>
    `had ${counted(numberOf(detail, "total") ?? 0, "hand-in", "hand-ins")} reduced again after the part ${names.part ?? textOf(detail, "partLabel") ?? "since deleted"} changed`,
  "kit.moved": ({ names, detail }) =>
    `moved kit ${names.kit ?? "since deleted"} from ${stateWords(detail.from)} to ${stateWords(detail.to)}`,
  "kit.tracking_imported": ({ detail }) =>
    `imported tracking numbers from a file (${counted(numberOf(detail, "rows") ?? 0, "row", "rows")})`,
  "shipment.retried": () => "sent a failed shipment again",
  "address.viewed": ({ names }) => `saw the shipping address of ${names.member ?? names.invitee ?? "a former member"}`,
  "address.changed": ({ names }) => `entered or changed the shipping address of ${names.member ?? names.invitee ?? "a former member"}`,
  "address.deleted": ({ names }) => `deleted the shipping address of ${names.member ?? names.invitee ?? "a former member"}`,
  "address.exported": ({ names }) => `downloaded the shipping address of ${names.member ?? names.invitee ?? "a former member"}`,
  "address.imported": ({ names }) => `imported the shipping address of ${names.member ?? names.invitee ?? "a former member"}`,
  "member.record_viewed": ({ names }) => `opened the record of ${names.member ?? "a former member"}`,
};

/** One event as a sentence: "Ada Byron saved the rubric of “Drag on a sphere” (3 criteria)." */
export function auditSentence(entry: AuditEntry): string {
  const who = entry.actorName ?? "Someone no longer in the course";
  const what = sentences[entry.action]?.(entry) ?? actionWords[entry.action] ?? "made a change";
  return `${who} ${what}.`;
}
