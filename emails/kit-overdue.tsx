import { Text } from "@react-email/components";
import { ActionButton, EmailLayout, FactList, Heading, Paragraph, palette } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";
import { counted } from "../app/lib/plural";

type Props = EmailTemplates["kit-overdue"];

export const subject = (props: Props) => `Please send back your ${props.courseTitle} kit ${props.kitNumber}`;

/** To a student whose kit is still at home after the course's return-by date, on each reminder day. */
export default function KitOverdueEmail(props: Props) {
  const days = counted(props.daysOverdue, "day", "days");
  return (
    <EmailLayout
      preview={`Kit ${props.kitNumber} was due back on ${props.returnBy}`}
      reason={`You got this e-mail because you hold lab kit ${props.kitNumber} of ${props.courseTitle} and it was due back ${days} ago.`}
    >
      <Heading>Your lab kit is due back</Heading>
      <Paragraph>
        Kits were due back by {props.returnBy}, and yours is still marked as at home. Pack every part as it came, send the parcel to the
        address below, and then enter the carrier and tracking number on your kit page so that we can follow it.
      </Paragraph>
      <FactList
        facts={[
          ["Kit", props.kitNumber],
          ["Return by", props.returnBy],
          ["Overdue by", days],
        ]}
      />
      {props.returnAddress.length ? (
        <Text style={{ fontSize: "15px", lineHeight: "22px", margin: "16px 0", color: palette.ink }}>
          <strong>Send it to</strong>
          {props.returnAddress.map((line) => (
            <span key={line}>
              <br />
              {line}
            </span>
          ))}
        </Text>
      ) : (
        <Paragraph>Your instructor will tell you where to send it: reply to them if you have not heard.</Paragraph>
      )}
      <Paragraph>If you have already sent it, enter its tracking number on your kit page and this reminder stops.</Paragraph>
      <ActionButton href={props.kitUrl}>Open your kit page</ActionButton>
    </EmailLayout>
  );
}

KitOverdueEmail.PreviewProps = {
  courseTitle: "Demo: Fluids at the Kitchen Table",
  kitNumber: "DEMO-K-007",
  returnBy: "Fri, 28 May 2027",
  daysOverdue: 7,
  returnAddress: ["Demo Fluids Lab", "1 Example Quay", "D00 DEMO Demotown", "IE"],
  kitUrl: "https://benchpost.example/courses/demo/my-kit",
} satisfies Props;
