/**
 * The tracking import's commit: the previewed rows are checked again against the kits as they are now,
 * then written in one transaction, every row or none. Kits that start a leg move through `moveKits`
 * (an outbound parcel e-mails its student through the outbox); kits already on that leg get their
 * parcel corrected. Each preview carries its own import key, so a resent commit writes nothing twice.
 */
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import { auditEvents, courseMemberships, invitations, kitEvents, kits, users } from "~/db/schema";
import { AppError } from "~/lib/app-error";
import {
  checkTrackingRows,
  type TrackingDirection,
  type TrackingKit,
  type TrackingRow,
  type TrackingRowCheck,
} from "~/lib/shipping/tracking-rows";
import { recordAudit } from "~/server/audit.server";
import type { Database, Executor, Transaction } from "~/server/db.server";
import { moveKits, perKit, type Shipping } from "~/server/kits/kits.server";

export type TrackingImportCounts = { moved: number; corrected: number; unchanged: number };

export type TrackingImportResult =
  | ({ ok: true; duplicate: false } & TrackingImportCounts)
  /** This import key was committed before: nothing was written again. */
  | ({ ok: true; duplicate: true; committedAt: Date } & TrackingImportCounts)
  | { ok: false; problems: TrackingRowCheck[] };

/** Every kit of the course with its holder (a member, or an invited student) and both parcels: one statement. */
export async function trackingImportKits(executor: Executor, courseId: string): Promise<TrackingKit[]> {
  return executor
    .select({
      id: kits.id,
      number: kits.number,
      state: kits.state,
      holderName: sql<string | null>`coalesce(${users.name}, ${invitations.name}, ${invitations.email})`,
      carrier: kits.carrier,
      trackingNumber: kits.trackingNumber,
      shippedOn: kits.shippedOn,
      returnCarrier: kits.returnCarrier,
      returnTrackingNumber: kits.returnTrackingNumber,
      returnShippedOn: kits.returnShippedOn,
    })
    .from(kits)
    .leftJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
    .leftJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(invitations, eq(invitations.id, kits.holderInvitationId))
    .where(eq(kits.courseId, courseId))
    .orderBy(sql`length(${kits.number})`, asc(kits.number));
}

const auditSubject = (importKey: string) => `tracking-import:${importKey}`;

export async function importTracking(
  db: Database,
  {
    courseId,
    actorId,
    direction,
    importKey,
    rows,
    request,
  }: { courseId: string; actorId: string; direction: TrackingDirection; importKey: string; rows: TrackingRow[]; request?: Request },
): Promise<TrackingImportResult> {
  return db.transaction(async (tx) => {
    // Raw: an advisory lock has no query-builder form. A second commit of the same key waits here for
    // the first one's transaction, then finds its audit row, so two clicks racing cannot both write.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`tracking-import:${courseId}:${importKey}`}, 0))`);
    const [earlier] = await tx
      .select({ committedAt: auditEvents.createdAt, detail: auditEvents.detail })
      .from(auditEvents)
      .where(
        and(
          eq(auditEvents.courseId, courseId),
          eq(auditEvents.action, "kit.tracking_imported"),
          eq(auditEvents.subject, auditSubject(importKey)),
        ),
      );
    if (earlier) return { ok: true, duplicate: true, committedAt: earlier.committedAt, ...(earlier.detail.counts as TrackingImportCounts) };

    const checks = checkTrackingRows(rows, direction, await trackingImportKits(tx, courseId));
    const problems = checks.filter((check) => check.problems.length > 0);
    if (problems.length) return { ok: false, problems };

    const parcels = (outcome: TrackingRowCheck["outcome"]) =>
      Object.fromEntries(checks.filter((check) => check.outcome === outcome).map((check) => [check.kit!.id, check.parcel!]));
    const moving = parcels(direction === "outbound" ? "ship" : "return");
    const correcting = parcels("correct");
    if (Object.keys(moving).length) {
      await moveKits(tx, {
        courseId,
        actorId,
        kitIds: Object.keys(moving),
        move: { to: direction === "outbound" ? "in_transit" : "coming_back", shipping: moving, note: "From the tracking import" },
      });
    }
    if (Object.keys(correcting).length) await correctParcels(tx, { actorId, direction, parcels: correcting });
    const counts = {
      moved: Object.keys(moving).length,
      corrected: Object.keys(correcting).length,
      unchanged: checks.filter((check) => check.outcome === "same").length,
    };
    await recordAudit(tx, {
      action: "kit.tracking_imported",
      actorId,
      courseId,
      subject: auditSubject(importKey),
      detail: { direction, rows: rows.length, counts },
      request,
    });
    return { ok: true, duplicate: false, ...counts };
  });
}

/**
 * A kit already on its leg gets the file's parcel in place of the one it had, kept in its history.
 * No new e-mail: the student's kit page shows the corrected number. One UPDATE and one INSERT.
 */
async function correctParcels(
  tx: Transaction,
  { actorId, direction, parcels }: { actorId: string; direction: TrackingDirection; parcels: Record<string, Shipping> },
): Promise<void> {
  const ids = Object.keys(parcels);
  const column = (pick: (parcel: Shipping) => string) => perKit(ids, (id) => pick(parcels[id]));
  const values = {
    carrier: column((p) => p.carrier),
    trackingNumber: column((p) => p.trackingNumber),
    shippedOn: column((p) => p.shippedOn),
  };
  const state = direction === "outbound" ? "in_transit" : "coming_back";
  const updated = await tx
    .update(kits)
    .set({
      ...(direction === "outbound"
        ? values
        : { returnCarrier: values.carrier, returnTrackingNumber: values.trackingNumber, returnShippedOn: values.shippedOn }),
      updatedAt: new Date(),
    })
    // The state is checked again here: a kit that moved on since it was read is not silently changed.
    .where(and(inArray(kits.id, ids), eq(kits.state, state)))
    .returning({ id: kits.id });
  if (updated.length !== ids.length)
    throw new AppError({ code: "kit_refused", message: "Some kits changed while the file was imported; read the file again." });
  await tx.insert(kitEvents).values(
    ids.map((kitId) => ({
      kitId,
      actorId,
      action: direction === "outbound" ? "tracking_corrected" : "return_tracking_corrected",
      note: "From the tracking import",
      detail: { shipping: parcels[kitId] },
    })),
  );
}
