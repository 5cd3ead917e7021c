import { ActionButton, EmailLayout, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";
import { counted } from "../app/lib/plural";

type Props = EmailTemplates["sign-in-link"];

export const subject = () => "Your Benchpost sign-in link";

export default function SignInLinkEmail(props: Props) {
  return (
    <EmailLayout
      preview="Sign in to Benchpost with one click"
      reason="You got this e-mail because someone asked to sign in to Benchpost with this address. If it was not you, ignore it: nobody can sign in without the link."
    >
      <Heading>Sign in to Benchpost</Heading>
      <Paragraph>
        Use the button below to sign in. The link works once and expires in {counted(props.expiresInMinutes, "minute", "minutes")}.
      </Paragraph>
      <ActionButton href={props.url}>Sign in</ActionButton>
    </EmailLayout>
  );
}

SignInLinkEmail.PreviewProps = { url: "https://benchpost.example/sign-in/demo-token", expiresInMinutes: 15 } satisfies Props;
