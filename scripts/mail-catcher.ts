/**
 * `npm run mail-catcher`: the development SMTP catcher on 127.0.0.1:1025 (MAIL_CATCHER_PORT overrides).
 * Messages land in the database; read them at /dev/inbox. Started by `npm start`.
 */
import { env } from "./lib/checked-environment";
import { startMailCatcher } from "~/server/email/mail-catcher.server";

const catcher = await startMailCatcher({ connectionString: env.DATABASE_URL, port: env.MAIL_CATCHER_PORT });
console.log(`Mail catcher listening on smtp://127.0.0.1:${catcher.port}`);

const stop = async () => {
  await catcher.close();
  process.exit(0);
};
process.once("SIGINT", stop);
process.once("SIGTERM", stop);
