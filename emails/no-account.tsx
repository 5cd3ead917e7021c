import { ActionButton, EmailLayout, Heading, Paragraph } from "./components/email-layout";
import type { EmailTemplates } from "./template-props";

type Props = EmailTemplates["no-account"];

const asked = { sign_in: "a sign-in link", password_reset: "a password reset" } as const;

export const subject = () => "No Benchpost account uses this address";

/**
 * Sent instead of a link when nobody has an account with the address, so that asking for a link does
 * the same work (and takes the same time) whether or not an account exists.
 */
export default function NoAccountEmail(props: Props) {
  return (
    <EmailLayout
      preview="Someone asked for a Benchpost link for this address"
      reason={`You got this e-mail because someone asked for ${asked[props.purpose]} with this address. If it was not you, ignore it: nothing has changed.`}
    >
      <Heading>There is no Benchpost account with this address</Heading>
      <Paragraph>
        Someone asked for {asked[props.purpose]} for this address, but no account uses it. If you have an account, it may be under another
        address: try that one. Students and teaching assistants get their account from the invitation e-mail their instructor sends.
      </Paragraph>
      {props.signUpUrl ? (
        <>
          <Paragraph>If you teach a course, you can create an instructor account.</Paragraph>
          <ActionButton href={props.signUpUrl}>Create an instructor account</ActionButton>
        </>
      ) : null}
    </EmailLayout>
  );
}

NoAccountEmail.PreviewProps = { purpose: "password_reset", signUpUrl: "https://benchpost.example/sign-up" } satisfies Props;
