import { ActionButton, EmailLayout, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";
import { counted } from "../app/lib/plural";

type Props = EmailTemplates["password-reset"];

export const subject = () => "Choose a new Benchpost password";

export default function PasswordResetEmail(props: Props) {
  return (
    <EmailLayout
      preview="A link to choose a new password"
      reason="You got this e-mail because someone asked to reset the Benchpost password of this address. If it was not you, ignore it: your password stays as it is."
    >
      <Heading>Choose a new password</Heading>
      <Paragraph>
        Use the button below to choose a new password. The link works once and expires in{" "}
        {counted(props.expiresInMinutes, "minute", "minutes")}; after that, ask for a new one from the sign-in page.
      </Paragraph>
      <ActionButton href={props.url}>Choose a new password</ActionButton>
    </EmailLayout>
  );
}

PasswordResetEmail.PreviewProps = { url: "https://benchpost.example/reset-password/demo-token", expiresInMinutes: 30 } satisfies Props;
