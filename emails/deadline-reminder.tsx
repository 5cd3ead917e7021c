import { ActionButton, EmailLayout, FactList, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";
import { timeLeftSentence, timeLeftWords } from "../app/lib/labs/deadline-words";

type Props = EmailTemplates["deadline-reminder"];

export const subject = (props: Props) => `${props.labTitle} is due in ${timeLeftWords(props.hoursLeft)}`;

export default function DeadlineReminderEmail(props: Props) {
  return (
    <EmailLayout
      preview={`Hand in your drop log for ${props.labTitle}`}
      reason={`You got this e-mail because you are a student in ${props.courseTitle} and have not handed in a drop log for ${props.labTitle} yet.`}
    >
      <Heading>{props.labTitle} is due soon</Heading>
      <Paragraph>
        {timeLeftSentence(props.hoursLeft)} You can hand in from your phone. Every hand-in is kept as a version of its own, and your latest
        one is the one that counts. A hand-in after the due time is taken and labelled late; the lab page says until when late hand-ins are
        taken.
      </Paragraph>
      <FactList
        facts={[
          ["Course", props.courseTitle],
          ["Lab", props.labTitle],
          ["Due", props.dueAtText],
        ]}
      />
      <ActionButton href={props.labUrl}>Open the lab</ActionButton>
    </EmailLayout>
  );
}

DeadlineReminderEmail.PreviewProps = {
  courseTitle: "Demo: Fluids at the Kitchen Table",
  labTitle: "Demo lab: Falling-ball viscometry",
  dueAtText: "Fri, 18 Jan 2030, 17:00 WET",
  hoursLeft: 24,
  labUrl: "https://benchpost.example/courses/demo/labs/demo-lab",
} satisfies Props;
