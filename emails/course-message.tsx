import { ActionButton, EmailLayout, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";

type Props = EmailTemplates["course-message"];

export const subject = (props: Props) => `${props.courseTitle}: ${props.subject}`;

/** The author's plain text: a blank line starts a paragraph, a single line break stays one. */
const paragraphsOf = (body: string) => body.split(/\r?\n\s*\r?\n/).map((paragraph) => paragraph.split(/\r?\n/));

export default function CourseMessageEmail(props: Props) {
  return (
    <EmailLayout
      preview={`${props.authorName} wrote to you in ${props.courseTitle}`}
      reason={`You got this e-mail because you are a student of ${props.courseTitle} and ${props.authorName}, who teaches it, wrote to you.`}
    >
      <Heading>{props.subject}</Heading>
      <Paragraph>
        From {props.authorName}, in {props.courseTitle}:
      </Paragraph>
      {paragraphsOf(props.body).map((lines, index) => (
        <Paragraph key={index}>
          {lines.map((line, lineIndex) => (
            <span key={lineIndex}>
              {lineIndex > 0 ? <br /> : null}
              {line}
            </span>
          ))}
        </Paragraph>
      ))}
      <ActionButton href={props.courseUrl}>Open the course</ActionButton>
    </EmailLayout>
  );
}

CourseMessageEmail.PreviewProps = {
  courseTitle: "Demo: Fluids at the Kitchen Table",
  authorName: "Dr Demo Instructor",
  subject: "Lab 2 is due on Friday",
  body: "Hello all,\n\nThe viscometry lab is due on Friday at 17:00. If your kit has not arrived, write to me today.\n\nBest wishes",
  courseUrl: "https://benchpost.example/courses/demo",
} satisfies Props;
