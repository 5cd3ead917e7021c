/** Every e-mail template by name, with its subject line and the invented props its preview shows. */
import type { ComponentType } from "react";
import CourseInvitationEmail, { subject as courseInvitationSubject } from "./course-invitation";
import CourseMessageEmail, { subject as courseMessageSubject } from "./course-message";
import DeadlineReminderEmail, { subject as deadlineReminderSubject } from "./deadline-reminder";
import HandInReceiptEmail, { subject as handInReceiptSubject } from "./hand-in-receipt";
import KitOverdueEmail, { subject as kitOverdueSubject } from "./kit-overdue";
import KitProblemEmail, { subject as kitProblemSubject } from "./kit-problem";
import KitProblemUpdateEmail, { subject as kitProblemUpdateSubject } from "./kit-problem-update";
import KitShippedEmail, { subject as kitShippedSubject } from "./kit-shipped";
import MarksReleasedEmail, { subject as marksReleasedSubject } from "./marks-released";
import NoAccountEmail, { subject as noAccountSubject } from "./no-account";
import PasswordResetEmail, { subject as passwordResetSubject } from "./password-reset";
import SignInLinkEmail, { subject as signInLinkSubject } from "./sign-in-link";
import type { EmailTemplateName, EmailTemplates } from "./template-props";

export type EmailTemplate<Props> = { Component: ComponentType<Props>; subject: (props: Props) => string; previewProps: Props };

export const emailTemplates: { [Name in EmailTemplateName]: EmailTemplate<EmailTemplates[Name]> } = {
  "course-invitation": {
    Component: CourseInvitationEmail,
    subject: courseInvitationSubject,
    previewProps: CourseInvitationEmail.PreviewProps,
  },
  "sign-in-link": { Component: SignInLinkEmail, subject: signInLinkSubject, previewProps: SignInLinkEmail.PreviewProps },
  "password-reset": { Component: PasswordResetEmail, subject: passwordResetSubject, previewProps: PasswordResetEmail.PreviewProps },
  "no-account": { Component: NoAccountEmail, subject: noAccountSubject, previewProps: NoAccountEmail.PreviewProps },
  "deadline-reminder": {
    Component: DeadlineReminderEmail,
    subject: deadlineReminderSubject,
    previewProps: DeadlineReminderEmail.PreviewProps,
  },
  "kit-shipped": { Component: KitShippedEmail, subject: kitShippedSubject, previewProps: KitShippedEmail.PreviewProps },
  "kit-problem": { Component: KitProblemEmail, subject: kitProblemSubject, previewProps: KitProblemEmail.PreviewProps },
  "kit-problem-update": {
    Component: KitProblemUpdateEmail,
    subject: kitProblemUpdateSubject,
    previewProps: KitProblemUpdateEmail.PreviewProps,
  },
  "kit-overdue": { Component: KitOverdueEmail, subject: kitOverdueSubject, previewProps: KitOverdueEmail.PreviewProps },
  "marks-released": { Component: MarksReleasedEmail, subject: marksReleasedSubject, previewProps: MarksReleasedEmail.PreviewProps },
  "course-message": { Component: CourseMessageEmail, subject: courseMessageSubject, previewProps: CourseMessageEmail.PreviewProps },
  "hand-in-receipt": { Component: HandInReceiptEmail, subject: handInReceiptSubject, previewProps: HandInReceiptEmail.PreviewProps },
};
