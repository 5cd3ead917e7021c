/**
 * `npm run worker`: delivers e-mail (and, later, runs other background jobs) until stopped.
 * Started by `npm start`; in production run one or more of it beside the web server.
 */
import { startWorker } from "~/server/jobs/worker.server";
import { transportFromEnvironment } from "~/server/email/email-transport.server";
import { developmentDatabaseUrl } from "./lib/database-url";

const transport = transportFromEnvironment();
const worker = await startWorker({ connectionString: developmentDatabaseUrl(), transport });
console.log(`Worker running; e-mail goes out via ${transport.name}.`);

const stop = async () => {
  await worker.stop();
  process.exit(0);
};
process.once("SIGINT", stop);
process.once("SIGTERM", stop);
