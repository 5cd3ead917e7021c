/**
 * The worker: delivers e-mail (and runs the other background jobs) until stopped. `npm start` runs it
 * from source; in production `npm run start:worker` runs its bundled copy (build/worker.js), one or
 * more of them beside the web server.
 */
import { env } from "./lib/checked-environment";
import { startWorker } from "~/server/jobs/worker.server";
import { transportFromEnvironment } from "~/server/email/email-transport.server";
import { logger } from "~/server/log.server";

const transport = transportFromEnvironment(env);
const worker = await startWorker({ connectionString: env.DATABASE_URL, transport });
logger.info({ transport: transport.name }, `Worker running; e-mail goes out via ${transport.name}.`);

const stop = async () => {
  await worker.stop();
  process.exit(0);
};
process.once("SIGINT", stop);
process.once("SIGTERM", stop);
