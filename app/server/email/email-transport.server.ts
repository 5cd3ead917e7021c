/**
 * Where delivered mail goes: Resend when RESEND_API_KEY is set, otherwise SMTP to SMTP_URL (by default the
 * local mail catcher).
 * Each transport returns the provider's message id, which the outbox keeps.
 */
import nodemailer from "nodemailer";
import { Resend } from "resend";
import { type Environment, environment } from "~/server/env.server";

export type OutgoingEmail = { outboxId: string; to: string; toName: string | null; subject: string; html: string; text: string };
export type EmailTransport = {
  name: "resend" | "smtp";
  deliver(email: OutgoingEmail): Promise<{ providerMessageId: string }>;
  close?(): void;
};

/** A failure worth retrying; its message goes into the outbox row's `last_error`. */
export class EmailDeliveryError extends Error {
  override name = "EmailDeliveryError";
}

/**
 * The recipient as one RFC 5322 mailbox, for Resend, whose SDK takes only strings: the name as a
 * quoted-string with `\` and `"` escaped as quoted-pairs (RFC 5322 §3.2.4). Line breaks cannot occur
 * inside a quoted-string, so any control character becomes a space.
 */
export function formatMailbox(email: Pick<OutgoingEmail, "to" | "toName">): string {
  if (!email.toName) return email.to;
  const name = email.toName.replace(/\p{Cc}/gu, " ").replace(/["\\]/g, "\\$&");
  return `"${name}" <${email.to}>`;
}

export function resendTransport(apiKey: string, from: string): EmailTransport {
  const resend = new Resend(apiKey);
  return {
    name: "resend",
    async deliver(email) {
      // The outbox id as idempotency key: a retry after a lost response cannot send the message twice.
      const { data, error } = await resend.emails.send(
        { from, to: [formatMailbox(email)], subject: email.subject, html: email.html, text: email.text },
        { idempotencyKey: email.outboxId },
      );
      if (error || !data)
        throw new EmailDeliveryError(`Resend refused the message (${error?.statusCode ?? "no status"} ${error?.name}): ${error?.message}`);
      return { providerMessageId: data.id };
    },
  };
}

/**
 * Bounded waits, well inside a delivery attempt's lease (deliver-email.server.ts), so that a slow server
 * can never leave an attempt running once a retry may start. Values are common practice.
 */
const SMTP_TIMEOUTS = { connectionTimeout: 20_000, greetingTimeout: 15_000, socketTimeout: 60_000 };

export function smtpTransport(url: string, from: string): EmailTransport {
  const transporter = nodemailer.createTransport(url, SMTP_TIMEOUTS);
  // The Message-ID's right-hand side is the sender's own domain (RFC 5322 §3.6.4).
  const messageIdDomain = from.match(/@([^>\s]+)/)?.[1] ?? "benchpost.localhost";
  return {
    name: "smtp",
    async deliver(email) {
      const info = await transporter.sendMail({
        from,
        // An address object: nodemailer quotes or MIME-encodes the name itself.
        to: email.toName ? { name: email.toName, address: email.to } : email.to,
        subject: email.subject,
        html: email.html,
        text: email.text,
        // One Message-ID per outbox row, the same on every attempt: a copy sent again after an attempt
        // was cut off is recognisably the same message.
        messageId: `<${email.outboxId}@${messageIdDomain}>`,
        // Ties a caught message back to its outbox row, and makes an accidental duplicate visible.
        headers: { "X-Benchpost-Outbox-Id": email.outboxId },
      });
      return { providerMessageId: info.messageId };
    },
    close: () => transporter.close(),
  };
}

/** Outside production, without SMTP_URL, mail goes to the local catcher. */
export function transportFromEnvironment(config: Environment = environment()): EmailTransport {
  if (config.RESEND_API_KEY) return resendTransport(config.RESEND_API_KEY, config.EMAIL_FROM);
  return smtpTransport(config.SMTP_URL ?? `smtp://127.0.0.1:${config.MAIL_CATCHER_PORT}`, config.EMAIL_FROM);
}

/** True when mail really leaves the building; the development inbox is never offered then. */
export function sendsRealMail(): boolean {
  return Boolean(environment().RESEND_API_KEY);
}
