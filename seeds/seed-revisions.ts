/**
 * The demo's part correction: GLY-95A, recorded 20 % less viscous than the fluid in its bottles (see
 * seed-labs.ts), is re-measured by the instructor after the drag lab's marks were released. Every drag
 * hand-in then has a second reduction revision naming the correction, the desk and moderation show the
 * changed results, and the lot's bias flag clears. It goes through the app's own re-measurement and
 * runs the re-reduction at once, so the demo does not wait for a worker (the queued job then finds it done).
 */
import { and, desc, eq } from "drizzle-orm";
import { courseMemberships, parts, rereductionRuns } from "~/db/schema";
import type { Database } from "~/server/db.server";
import { updatePart } from "~/server/kits/parts.server";
import { runRereduction } from "~/server/kits/rereduce.server";

export async function seedRevisions(db: Database, { courseId }: { courseId: string }): Promise<void> {
  const [lot] = await db
    .select()
    .from(parts)
    .where(and(eq(parts.courseId, courseId), eq(parts.label, "GLY-95A")));
  const [instructor] = await db
    .select({ userId: courseMemberships.userId })
    .from(courseMemberships)
    .where(and(eq(courseMemberships.courseId, courseId), eq(courseMemberships.role, "instructor")));
  await updatePart(db, {
    courseId,
    partId: lot.id,
    actorId: instructor.userId,
    input: {
      kind: "fluid_lot",
      label: lot.label,
      notes: lot.notes,
      // The thicker fluid is a stronger mix, so the handbook check agrees with the corrected record too.
      fluidName: "Glycerol–water, 96.5 % glycerol by mass",
      glycerolMassFraction: 0.965,
      densityKgM3: lot.densityKgM3!,
      calibration: lot.calibration!.map((point) => ({
        temperatureC: point.temperatureC,
        viscosityPaS: Number((point.viscosityPaS * 1.2).toFixed(3)),
      })),
    },
    note: "Re-measured with the rotational viscometer and the refractometer: the batch was mixed with less water than recorded.",
  });
  const [run] = await db
    .select({ id: rereductionRuns.id })
    .from(rereductionRuns)
    .where(eq(rereductionRuns.partId, lot.id))
    .orderBy(desc(rereductionRuns.createdAt))
    .limit(1);
  await runRereduction(db, run.id);
}
