import { Section, Text } from "@react-email/components";
import { safetyCautions, safetyCautionsDeferral } from "../app/lib/safety/cautions";
import { ActionButton, EmailLayout, FactList, Heading, Paragraph, palette } from "./components/email-layout";
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
        When it arrives, open the kit page to confirm that everything is there and undamaged before your first drop, and read the safety
        cautions below before you unpack it.
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
      <SafetyCautions />
    </EmailLayout>
  );
}

/** The same cautions as the kit pages, as e-mail-safe blocks (mail clients drop list styling unevenly). */
function SafetyCautions() {
  return (
    <Section
      style={{
        borderLeft: `4px solid ${palette.amber}`,
        backgroundColor: palette.paperDeep,
        borderRadius: "8px",
        padding: "8px 16px",
        margin: "20px 0 8px",
      }}
    >
      <Text style={{ fontSize: "16px", fontWeight: 600, margin: "8px 0", color: palette.amberDeep }}>Safety</Text>
      {safetyCautions.map((caution) => (
        <Text key={caution.topic} style={{ fontSize: "14px", lineHeight: "21px", margin: "6px 0", color: palette.ink }}>
          <strong>{caution.topic}.</strong> {caution.text}
        </Text>
      ))}
      <Text style={{ fontSize: "12px", lineHeight: "18px", margin: "8px 0", color: palette.inkSoft }}>{safetyCautionsDeferral}</Text>
    </Section>
  );
}

KitShippedEmail.PreviewProps = {
  courseTitle: "Demo: Fluids at the Kitchen Table",
  kitNumber: "DEMO-K-007",
  carrier: "Demo Parcel Post",
  trackingNumber: "DEMO0000000007",
  shippedOn: "Mon, 7 Jan 2030",
  kitUrl: "https://benchpost.example/courses/demo/kits/demo-kit",
} satisfies Props;
