import { ActionButton, EmailLayout, FactList, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";

type Props = EmailTemplates["kit-problem"];

export const subject = (props: Props) => `Kit ${props.kitNumber}: ${props.studentName} reports a ${props.problem} part`;

/** To the course's instructors when a student reports a missing or damaged part, or an incomplete parcel. */
export default function KitProblemEmail(props: Props) {
  return (
    <EmailLayout
      preview={`${props.studentName} reports a problem with kit ${props.kitNumber}`}
      reason={`You got this e-mail because you are an instructor of ${props.courseTitle} and a student reported a problem with their kit.`}
    >
      <Heading>A student reports a problem with their kit</Heading>
      <Paragraph>{props.note}</Paragraph>
      <FactList
        facts={[
          ["Kit", props.kitNumber],
          ["Student", props.studentName],
          ["Part", props.partLabel ?? "not named"],
          ["Problem", props.problem],
        ]}
      />
      <ActionButton href={props.kitUrl}>Open the problem</ActionButton>
    </EmailLayout>
  );
}

KitProblemEmail.PreviewProps = {
  courseTitle: "Demo: Fluids at the Kitchen Table",
  kitNumber: "DEMO-K-007",
  studentName: "Demo Student",
  partLabel: "DEMO-S-3",
  problem: "damaged",
  note: "The glass sphere arrived chipped.",
  kitUrl: "https://benchpost.example/courses/demo/kits/problems/demo-problem",
} satisfies Props;
