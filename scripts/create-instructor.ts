/**
 * `npm run user:create-instructor -- --email … --name …`: an instructor account (one that may open
 * courses) without open sign-up. No password is set here, so none lands in shell history: the
 * instructor signs in with an e-mailed link, or chooses a password through "Forgot your password?".
 * Production runs its bundled copy: `NODE_ENV=production node build/create-instructor.js --email … --name …`.
 */
import { env } from "./lib/checked-environment";
import { parseArgs } from "node:util";
import { z } from "zod";
import { createInstructorAccount } from "~/server/auth/sign-in.server";
import { createDatabase, createPool } from "~/server/db.server";

const { values } = parseArgs({ options: { email: { type: "string" }, name: { type: "string" } } });
const input = z.object({ email: z.email(), name: z.string().trim().min(1).max(120) }).safeParse(values);
if (!input.success) {
  console.error('Usage: npm run user:create-instructor -- --email someone@example.org --name "Dr. Someone"');
  process.exit(1);
}

const pool = createPool();
try {
  const outcome = await createInstructorAccount(createDatabase(pool), input.data);
  console.log(
    outcome === "created"
      ? `Created the instructor account ${input.data.email}. Sign in at ${env.APP_URL}/sign-in with an e-mailed link, or set a password at ${env.APP_URL}/forgot-password.`
      : `${input.data.email} already had an account; it may now open courses.`,
  );
} finally {
  await pool.end();
}
