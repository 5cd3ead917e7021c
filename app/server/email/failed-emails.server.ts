/** E-mails of a course that could not be delivered after every retry, for the course's instructors. */
import { and, desc, eq } from "drizzle-orm";
import { emailOutbox } from "~/db/schema";
import { type Executor, db } from "~/server/db.server";

export type FailedEmail = {
  id: string;
  toAddress: string;
  toName: string | null;
  subject: string;
  template: string;
  attempts: number;
  lastError: string | null;
  createdAt: Date;
  failedAt: Date | null;
};

/** The caller checks that the viewer is an instructor of the course; this only reads. */
export async function listFailedEmails(courseId: string, executor: Executor = db): Promise<FailedEmail[]> {
  return executor
    .select({
      id: emailOutbox.id,
      toAddress: emailOutbox.toAddress,
      toName: emailOutbox.toName,
      subject: emailOutbox.subject,
      template: emailOutbox.template,
      attempts: emailOutbox.attempts,
      lastError: emailOutbox.lastError,
      createdAt: emailOutbox.createdAt,
      failedAt: emailOutbox.failedAt,
    })
    .from(emailOutbox)
    .where(and(eq(emailOutbox.courseId, courseId), eq(emailOutbox.status, "failed")))
    .orderBy(desc(emailOutbox.failedAt))
    .limit(100);
}
