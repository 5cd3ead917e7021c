/**
 * What each e-mail template needs, as zod schemas: checked when a message is queued, and used again by
 * the worker to revive the JSON stored in the outbox (dates come back as ISO strings).
 */
import { z } from "zod";

// Props end up in a subject line or a header-adjacent place; a line break there could forge headers.
const oneLine = z
  .string()
  .trim()
  .min(1)
  .max(200)
  .refine((value) => !/[\r\n]/.test(value), "must be a single line (no CR or LF)");
const link = z.url({ protocol: /^https?$/ });

export const templatePropsSchemas = {
  "course-invitation": z.object({
    courseTitle: oneLine,
    courseCode: oneLine,
    inviterName: oneLine,
    role: z.enum(["instructor", "ta", "student"]),
    cohortName: oneLine.nullable(),
    acceptUrl: link,
    expiresAt: z.coerce.date(),
    // Invitations queued before the e-mails named the course's zone revive in UTC.
    timeZone: oneLine.default("UTC"),
  }),
  "sign-in-link": z.object({ url: link, expiresInMinutes: z.number().int().positive() }),
  "password-reset": z.object({ url: link, expiresInMinutes: z.number().int().positive() }),
  "no-account": z.object({ purpose: z.enum(["sign_in", "password_reset"]), signUpUrl: link.nullable() }),
  "deadline-reminder": z.object({
    courseTitle: oneLine,
    labTitle: oneLine,
    dueAtText: oneLine,
    hoursLeft: z.number().nonnegative(),
    labUrl: link,
  }),
  "kit-shipped": z.object({
    courseTitle: oneLine,
    kitNumber: oneLine,
    carrier: oneLine,
    trackingNumber: oneLine,
    shippedOn: oneLine,
    kitUrl: link,
  }),
  "marks-released": z.object({ courseTitle: oneLine, labTitle: oneLine, marksUrl: link }),
  "kit-problem": z.object({
    courseTitle: oneLine,
    kitNumber: oneLine,
    studentName: oneLine,
    partLabel: oneLine.nullable(),
    problem: z.enum(["missing", "damaged", "incomplete"]),
    note: z.string().trim().min(1).max(1000),
    kitUrl: link,
  }),
  "kit-problem-update": z.object({
    courseTitle: oneLine,
    kitNumber: oneLine,
    partLabel: oneLine.nullable(),
    status: z.enum(["received", "replacement_sent", "resolved"]),
    note: z.string().trim().min(1).max(1000).nullable(),
    replacementLabel: oneLine.nullable(),
    carrier: oneLine.nullable(),
    trackingNumber: oneLine.nullable(),
    kitUrl: link,
  }),
  "kit-overdue": z.object({
    courseTitle: oneLine,
    kitNumber: oneLine,
    returnBy: oneLine,
    daysOverdue: z.number().int().positive(),
    returnAddress: z.array(oneLine).max(8),
    kitUrl: link,
  }),
  "course-message": z.object({
    courseTitle: oneLine,
    authorName: oneLine,
    subject: oneLine,
    body: z.string().trim().min(1).max(5000),
    courseUrl: link,
  }),
  "hand-in-receipt": z.object({
    studentName: oneLine,
    courseTitle: oneLine,
    labTitle: oneLine,
    version: z.number().int().positive(),
    handedInAt: z.coerce.date(),
    timeZone: oneLine,
    late: z.boolean(),
    receiptUrl: link,
  }),
} as const;

export type EmailTemplates = {
  "course-invitation": {
    courseTitle: string;
    courseCode: string;
    inviterName: string;
    role: "instructor" | "ta" | "student";
    cohortName: string | null;
    acceptUrl: string;
    expiresAt: Date;
    /** The course's IANA zone, in which the expiry is written. */
    timeZone: string;
  };
  "sign-in-link": { url: string; expiresInMinutes: number };
  "password-reset": { url: string; expiresInMinutes: number };
  "no-account": { purpose: "sign_in" | "password_reset"; signUpUrl: string | null };
  "deadline-reminder": { courseTitle: string; labTitle: string; dueAtText: string; hoursLeft: number; labUrl: string };
  "kit-shipped": { courseTitle: string; kitNumber: string; carrier: string; trackingNumber: string; shippedOn: string; kitUrl: string };
  "marks-released": { courseTitle: string; labTitle: string; marksUrl: string };
  "kit-problem": {
    courseTitle: string;
    kitNumber: string;
    studentName: string;
    partLabel: string | null;
    problem: "missing" | "damaged" | "incomplete";
    note: string;
    kitUrl: string;
  };
  "kit-problem-update": {
    courseTitle: string;
    kitNumber: string;
    partLabel: string | null;
    status: "received" | "replacement_sent" | "resolved";
    note: string | null;
    replacementLabel: string | null;
    carrier: string | null;
    trackingNumber: string | null;
    kitUrl: string;
  };
  "kit-overdue": {
    courseTitle: string;
    kitNumber: string;
    returnBy: string;
    daysOverdue: number;
    /** The course's return address, one line each; empty when the course has not set one. */
    returnAddress: string[];
    kitUrl: string;
  };
  "course-message": { courseTitle: string; authorName: string; subject: string; body: string; courseUrl: string };
  "hand-in-receipt": {
    studentName: string;
    courseTitle: string;
    labTitle: string;
    version: number;
    handedInAt: Date;
    /** The course's IANA zone, named beside the time. */
    timeZone: string;
    late: boolean;
    receiptUrl: string;
  };
};
export type EmailTemplateName = keyof EmailTemplates;

// The written-out types above are the contract other modules code against; this keeps the schemas in step.
type SchemaOutputs = { [Name in EmailTemplateName]: z.output<(typeof templatePropsSchemas)[Name]> };
type SameType<A, B> = [A, B] extends [B, A] ? true : false;
true satisfies SameType<SchemaOutputs, EmailTemplates>;

export const emailTemplateNames = Object.keys(templatePropsSchemas) as EmailTemplateName[];
