/**
 * The development mail catcher: an SMTP server on loopback that accepts every message and keeps it in
 * the `caught_emails` table, where the development inbox and the tests read it. It never relays.
 */
import type { AddressInfo } from "node:net";
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";
import { caughtEmails } from "~/db/schema";
import { createDatabase, createPool } from "~/server/db.server";

export type MailCatcher = { port: number; close(): Promise<void> };

const MAX_MESSAGE_BYTES = 10 * 1024 * 1024;

export async function startMailCatcher(options: {
  connectionString: string;
  port: number;
  host?: string;
  log?: (message: string) => void;
}): Promise<MailCatcher> {
  const log = options.log ?? ((message: string) => console.log(message));
  const pool = createPool(options.connectionString);
  pool.on("error", (error) => log(`database connection lost: ${error.message}`));
  const database = createDatabase(pool);

  const server = new SMTPServer({
    // Loopback only and no credentials: it is a catcher, not a mail server.
    authOptional: true,
    disabledCommands: ["AUTH", "STARTTLS"],
    size: MAX_MESSAGE_BYTES,
    banner: "Benchpost mail catcher",
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (parsed) => {
          const envelopeRecipients = session.envelope.rcptTo.map((recipient) => recipient.address.toLowerCase());
          const headers: Record<string, string> = {};
          for (const { key, line } of parsed.headerLines) {
            const value = line.slice(line.indexOf(":") + 1).trim();
            headers[key] = headers[key] ? `${headers[key]}\n${value}` : value;
          }
          const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : "";
          await database.insert(caughtEmails).values({
            messageId: parsed.messageId ?? null,
            fromAddress: parsed.from?.text ?? envelopeFrom,
            toAddresses: envelopeRecipients,
            subject: parsed.subject ?? "",
            html: typeof parsed.html === "string" ? parsed.html : null,
            text: parsed.text ?? null,
            headers,
          });
          log(`caught "${parsed.subject ?? ""}" for ${envelopeRecipients.join(", ")}`);
          callback();
        })
        // A 4xx answer makes the sender retry later, which is what we want while the database is away.
        .catch((error: unknown) =>
          callback(Object.assign(new Error(`Could not store the message: ${String(error)}`), { responseCode: 451 })),
        );
    },
  });
  server.on("error", (error) => log(`SMTP: ${error.message}`));

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, options.host ?? "127.0.0.1", () => {
      server.off("error", reject);
      resolve();
    });
  });
  const port = (server.server.address() as AddressInfo).port;
  return {
    port,
    async close() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await pool.end();
    },
  };
}
