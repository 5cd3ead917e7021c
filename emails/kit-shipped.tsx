import { ActionButton, EmailLayout, FactList, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";

type Props = EmailTemplates["kit-shipped"];

export const subject = (props: Props) => `Your ${props.courseTitle} kit ${props.kitNumber} is on its way`;

export default function KitShippedEmail(props: Props) {
  return (
    <EmailLayout
      preview={`Kit ${props.kitNumber} was sent with ${props.carrier}`}
      reason={`You got this e-mail because a lab kit for ${props.courseTitle} was sent to you.`}
    >
      <Heading>Your lab kit is on its way</Heading>
      <Paragraph>
        When it arrives, open the kit page to confirm that everything is there and undamaged before your first drop. The kit
        contains magnets and small steel spheres: keep them away from young children, pets and implanted medical devices.
      </Paragraph>
      <FactList
        facts={[
          ["Kit", props.kitNumber],
          ["Sent on", props.shippedOn],
          ["Carrier", props.carrier],
          ["Tracking number", props.trackingNumber],
        ]}
      />
      <ActionButton href={props.kitUrl}>Open your kit page</ActionButton>
    </EmailLayout>
  );
}

KitShippedEmail.PreviewProps = {
  courseTitle: "Demo: Fluids at the Kitchen Table",
  kitNumber: "DEMO-K-007",
  carrier: "Demo Parcel Post",
  trackingNumber: "DEMO0000000007",
  shippedOn: "Monday 7 January 2030",
  kitUrl: "https://benchpost.example/courses/demo/kits/demo-kit",
} satisfies Props;
