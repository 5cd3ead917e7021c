import { ActionButton, EmailLayout, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";

type Props = EmailTemplates["marks-released"];

export const subject = (props: Props) => `Your mark for ${props.labTitle} is ready`;

export default function MarksReleasedEmail(props: Props) {
  return (
    <EmailLayout
      preview={`Marks and feedback for ${props.labTitle}`}
      reason={`You got this e-mail because you are a student of ${props.courseTitle} and the marks for ${props.labTitle} have now been released to you.`}
    >
      <Heading>Your mark for {props.labTitle} is ready</Heading>
      <Paragraph>
        The marks for {props.labTitle} in {props.courseTitle} have been released. Open the lab to see your mark, each criterion of the
        rubric with its feedback, and the result the server recomputed from the drop log your mark is based on.
      </Paragraph>
      <ActionButton href={props.marksUrl}>See your mark</ActionButton>
    </EmailLayout>
  );
}

MarksReleasedEmail.PreviewProps = {
  courseTitle: "Demo: Fluids at the Kitchen Table",
  labTitle: "Demo lab: Drag on a settling sphere",
  marksUrl: "https://benchpost.example/courses/demo/labs/demo-lab#mark",
} satisfies Props;
