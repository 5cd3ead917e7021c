/**
 * The demo's term mark book: the viscometry lab weighs twice the drag lab (a longer write-up), and no
 * lab is dropped while the term has only two.
 */
import { and, eq } from "drizzle-orm";
import { labs } from "~/db/schema";
import type { Database } from "~/server/db.server";

export async function seedMarkBook(db: Database, { courseId }: { courseId: string }): Promise<void> {
  await db
    .update(labs)
    .set({ markWeight: 2 })
    .where(and(eq(labs.courseId, courseId), eq(labs.kind, "viscometry")));
}
