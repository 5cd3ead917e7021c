import { ActionButton, EmailLayout, FactList, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";
import { formatDateTime } from "../app/lib/format-date";

type Props = EmailTemplates["course-invitation"];

const roleNames: Record<Props["role"], string> = { instructor: "an instructor", ta: "a teaching assistant", student: "a student" };

export const subject = (props: Props) => `${props.inviterName} invited you to ${props.courseCode} ${props.courseTitle}`;

export default function CourseInvitationEmail(props: Props) {
  const facts: [string, string][] = [
    ["Course", `${props.courseCode} ${props.courseTitle}`],
    ["Your role", roleNames[props.role]],
  ];
  if (props.cohortName) facts.push(["Cohort", props.cohortName]);
  facts.push(["Invitation valid until", formatDateTime(props.expiresAt, props.timeZone)]);
  return (
    <EmailLayout
      preview={`Join ${props.courseTitle} on Benchpost`}
      reason={`You got this e-mail because ${props.inviterName} invited this address to ${props.courseTitle} on Benchpost. If you were not expecting it, ignore it: nothing happens until the invitation is accepted.`}
    >
      <Heading>You are invited to {props.courseTitle}</Heading>
      <Paragraph>
        {props.inviterName} has added you to the course as {roleNames[props.role]}. Accept the invitation to see the course, its labs and{" "}
        {props.role === "student" ? "the kit you will be sent" : "the cohorts you look after"}.
      </Paragraph>
      <FactList facts={facts} />
      <ActionButton href={props.acceptUrl}>Accept the invitation</ActionButton>
    </EmailLayout>
  );
}

CourseInvitationEmail.PreviewProps = {
  courseTitle: "Demo: Fluids at the Kitchen Table",
  courseCode: "DEMO 101",
  inviterName: "Dr. Demo Instructor",
  role: "student",
  cohortName: "Demo cohort A",
  acceptUrl: "https://benchpost.example/invitations/demo-token",
  expiresAt: new Date("2030-01-15T17:00:00Z"),
  timeZone: "Europe/Lisbon",
} satisfies Props;
