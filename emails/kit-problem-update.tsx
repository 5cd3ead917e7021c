import { kitProblemStatusLabels } from "../app/lib/kits/kit-problem-states";
import { ActionButton, EmailLayout, FactList, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";

type Props = EmailTemplates["kit-problem-update"];

export const subject = (props: Props) => `Kit ${props.kitNumber}: your report is now “${kitProblemStatusLabels[props.status]}”`;

const headings: Record<Props["status"], string> = {
  received: "Your report has been received",
  replacement_sent: "A replacement is on its way",
  resolved: "Your report is resolved",
};

/** To the student who reported a problem with their kit, on each change of the problem's status. */
export default function KitProblemUpdateEmail(props: Props) {
  const facts: [string, string][] = [
    ["Kit", props.kitNumber],
    ["Reported part", props.partLabel ?? "not named"],
    ["Status", kitProblemStatusLabels[props.status]],
  ];
  if (props.replacementLabel) facts.push(["Replacement", props.replacementLabel]);
  if (props.carrier && props.trackingNumber) facts.push(["Carrier", props.carrier], ["Tracking number", props.trackingNumber]);
  return (
    <EmailLayout
      preview={`Kit ${props.kitNumber}: ${kitProblemStatusLabels[props.status]}`}
      reason={`You got this e-mail because you reported a problem with your ${props.courseTitle} kit.`}
    >
      <Heading>{headings[props.status]}</Heading>
      {props.note ? <Paragraph>{props.note}</Paragraph> : null}
      <FactList facts={facts} />
      <ActionButton href={props.kitUrl}>Open your kit page</ActionButton>
    </EmailLayout>
  );
}

KitProblemUpdateEmail.PreviewProps = {
  courseTitle: "Demo: Fluids at the Kitchen Table",
  kitNumber: "DEMO-K-007",
  partLabel: "DEMO-S-3",
  status: "replacement_sent",
  note: "A new sphere of the same size is in the post; keep the chipped one aside for now.",
  replacementLabel: "DEMO-S-12",
  carrier: "Demo Parcel Post",
  trackingNumber: "DEMO0000000042",
  kitUrl: "https://benchpost.example/courses/demo/my-kit",
} satisfies Props;
