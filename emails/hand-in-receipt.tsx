import { formatDateTime } from "../app/lib/format-date";
import { stateWords } from "../app/lib/marking/status-words";
import { ActionButton, EmailLayout, FactList, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";

type Props = EmailTemplates["hand-in-receipt"];

export const subject = (props: Props) => `Receipt: ${props.labTitle}, version ${props.version} handed in`;

export default function HandInReceiptEmail(props: Props) {
  return (
    <EmailLayout
      preview={`Version ${props.version} of ${props.labTitle} was stored`}
      reason={`You got this e-mail because you handed in a drop log for ${props.labTitle} in ${props.courseTitle}.`}
    >
      <Heading>Your hand-in is stored</Heading>
      <Paragraph>
        {props.studentName}, your drop log for {props.labTitle} was handed in and stored as version {props.version}. The latest version is
        the one that counts; keep this e-mail as your receipt.
      </Paragraph>
      <FactList
        facts={[
          ["Lab", props.labTitle],
          ["Version", String(props.version)],
          ["Handed in", formatDateTime(props.handedInAt, props.timeZone, "seconds")],
          // The same word staff read on the desk, and the sentence in the student's own terms.
          ["Timing", props.late ? `${stateWords["after-due"].word}: handed in after your due time` : "By your due time"],
        ]}
      />
      <ActionButton href={props.receiptUrl}>See your receipt</ActionButton>
    </EmailLayout>
  );
}

HandInReceiptEmail.PreviewProps = {
  studentName: "Ada Example",
  courseTitle: "Demo: Fluids at the Kitchen Table",
  labTitle: "Demo lab: Drag on a settling sphere",
  version: 2,
  handedInAt: new Date("2030-01-14T16:42:07Z"),
  timeZone: "Europe/London",
  late: false,
  receiptUrl: "https://benchpost.example/courses/demo/labs/demo-lab#receipt",
} satisfies Props;
