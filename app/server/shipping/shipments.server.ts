/**
 * Shipments: one instructor's action over many kits, with a label bought for each kit through the
 * carrier's API by a background job. Each kit keeps its own result (bought, or failed with the
 * carrier's reason), so a bulk shipment never half-fails silently, and a retry never buys a label twice:
 * a bought item is never bought again, and an item whose carrier shipment is known asks the carrier first.
 */
import { and, asc, count, eq, inArray, sql } from "drizzle-orm";
import { kits, shipmentItems, shipments } from "~/db/schema";
import { AppError } from "~/lib/app-error";
import type { PostalAddress } from "~/lib/shipping/postal-address";
import type { LabelFailureCode } from "~/lib/shipping/shipping-states";
import { insertMany } from "~/server/bulk-insert.server";
import type { Executor, Transaction } from "~/server/db.server";
import { enqueuer, queues, transactionAdapter } from "~/server/jobs/boss.server";
import { moveKits, type Shipping } from "~/server/kits/kits.server";
import { addressesFor } from "./addresses.server";
import { kitParcel, type Carrier, type LabelOutcome, type LabelRequest, type Parcel } from "./carrier.server";

export type { Carrier };

export type ShipmentKind = (typeof shipments.$inferSelect)["kind"];
export type LabelPurchaseJob = { shipmentId: string };

async function queueLabelPurchase(tx: Transaction, shipmentId: string): Promise<void> {
  await enqueuer().send(queues.labelPurchase, { shipmentId } satisfies LabelPurchaseJob, { db: transactionAdapter(tx) });
}

/**
 * One transaction: the shipment, one item per kit, and the label purchase job (inserted on the same
 * transaction, so it exists exactly when the shipment does). The same request key again answers the
 * first shipment, unchanged.
 */
export async function createShipment(
  executor: Executor,
  input: {
    courseId: string;
    actorId: string;
    kind: ShipmentKind;
    requestKey: string;
    items: { kitId: string; problemId?: string | null }[];
  },
): Promise<{ shipmentId: string; created: boolean }> {
  const kitIds = [...new Set(input.items.map((item) => item.kitId))];
  if (kitIds.length === 0) throw new AppError({ code: "shipment_refused", message: "Choose at least one kit to ship." });
  return executor.transaction(async (tx) => {
    const [inserted] = await tx
      .insert(shipments)
      .values({ courseId: input.courseId, kind: input.kind, requestKey: input.requestKey, createdById: input.actorId })
      .onConflictDoNothing()
      .returning({ id: shipments.id });
    if (!inserted) {
      const [first] = await tx
        .select({ id: shipments.id })
        .from(shipments)
        .where(and(eq(shipments.courseId, input.courseId), eq(shipments.requestKey, input.requestKey)));
      return { shipmentId: first.id, created: false };
    }
    const [{ found }] = await tx
      .select({ found: count() })
      .from(kits)
      .where(and(eq(kits.courseId, input.courseId), inArray(kits.id, kitIds)));
    if (found !== kitIds.length)
      throw new AppError({ code: "shipment_refused", message: "Some of the chosen kits are not in this course." });
    const problemOf = new Map(input.items.map((item) => [item.kitId, item.problemId ?? null]));
    await insertMany(
      tx,
      shipmentItems,
      kitIds.map((kitId) => ({ shipmentId: inserted.id, kitId, problemId: problemOf.get(kitId) ?? null })),
    );
    await queueLabelPurchase(tx, inserted.id);
    return { shipmentId: inserted.id, created: true };
  });
}

/** Failures a retry cannot mend until someone fixes an address. */
const needsAddressFix: LabelFailureCode[] = ["refused_address", "no_address"];

type ClaimedItem = {
  id: string;
  kit_id: string;
  course_id: string;
  holder_membership_id: string | null;
  holder_invitation_id: string | null;
  carrier_shipment_id: string | null;
  from_address: PostalAddress | null;
};

/**
 * Takes the shipment's queued items for this run (and items a crashed run left `buying` long ago), with
 * the course's return address, then their students' addresses: two statements. No one sees them here,
 * so reading them is not audited.
 */
async function claimItems(executor: Executor, shipmentId: string): Promise<(ClaimedItem & { to_address: PostalAddress | null })[]> {
  // Raw: an UPDATE … FROM that claims the items and joins what buying needs in one round trip.
  const result = await executor.execute<ClaimedItem>(sql`
    update shipment_items si set status = 'buying', updated_at = now()
    from shipments s, kits k, courses c
    where si.shipment_id = ${shipmentId} and s.id = si.shipment_id and k.id = si.kit_id and c.id = s.course_id
      and (si.status = 'queued' or (si.status = 'buying' and si.updated_at < now() - interval '10 minutes'))
    returning si.id, si.kit_id, c.id as course_id, k.holder_membership_id, k.holder_invitation_id, si.carrier_shipment_id,
      c.return_address as from_address`);
  const items = result.rows;
  if (items.length === 0) return [];
  const addresses = await addressesFor(executor, items[0].course_id, {
    membershipIds: items.flatMap((item) => (item.holder_membership_id ? [item.holder_membership_id] : [])),
    invitationIds: items.flatMap((item) => (item.holder_invitation_id ? [item.holder_invitation_id] : [])),
  });
  return items.map((item) => ({
    ...item,
    to_address: addresses.get((item.holder_membership_id ?? item.holder_invitation_id)!) ?? null,
  }));
}

type ItemResult =
  | { id: string; attempts: number; outcome: Extract<LabelOutcome, { ok: true }> }
  | { id: string; attempts: number; outcome: { ok: false; carrierShipmentId: string | null; code: LabelFailureCode; message: string } };

/** Writes one item's result as soon as it is known: a bought label and its carrier shipment are never lost to a later failure. */
async function saveResult(executor: Executor, result: ItemResult): Promise<void> {
  const { outcome } = result;
  await executor
    .update(shipmentItems)
    .set({
      status: outcome.ok ? "bought" : "failed",
      carrierShipmentId: sql`coalesce(${outcome.carrierShipmentId}, ${shipmentItems.carrierShipmentId})`,
      carrier: outcome.ok ? outcome.carrier : null,
      service: outcome.ok ? outcome.service : null,
      trackingNumber: outcome.ok ? outcome.trackingNumber : null,
      labelPdf: outcome.ok ? outcome.labelPdf : null,
      errorCode: outcome.ok ? null : outcome.code,
      errorMessage: outcome.ok ? null : outcome.message,
      attempts: sql`${shipmentItems.attempts} + ${result.attempts}`,
      updatedAt: new Date(),
    })
    .where(eq(shipmentItems.id, result.id));
}

export type LabelJobOptions = {
  /** One kit's box; `kitParcel` unless told. */
  parcel?: Parcel;
  /** Labels bought at once: the carrier's API is not flooded, and a slow answer does not hold up the rest. */
  concurrency?: number;
  /** Carrier calls per item in one run, counting the first: rate limits and timeouts are retried up to it. */
  maxAttempts?: number;
  /** The longest Retry-After waited for; a carrier asking longer leaves the item failed, to retry later. */
  maxRetryAfterSeconds?: number;
  sleep?: (ms: number) => Promise<void>;
};

const wait = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

/** Runs `work` over `items`, `limit` at a time. */
async function eachWithLimit<T>(items: T[], limit: number, work: (item: T) => Promise<void>): Promise<void> {
  let next = 0;
  const lanes = Array.from({ length: Math.min(limit, items.length) }, async () => {
    while (next < items.length) await work(items[next++]);
  });
  await Promise.all(lanes);
}

/**
 * The label purchase job for one shipment: buys a label for each queued item, `concurrency` at a
 * time, and writes each item's result as it comes. A rate limit is waited out (Retry-After) and a
 * timeout retried at once, a bounded number of times; the carrier shipment id from a failed attempt
 * goes with the retry, so that the carrier answers with the label it already sold. Then the kits of
 * bought outbound items move into transit, in batches.
 */
export async function buyLabels(
  executor: Executor,
  carrier: Carrier | null,
  shipmentId: string,
  options: LabelJobOptions = {},
): Promise<{ bought: number; failed: number; moved: number }> {
  const { parcel = kitParcel, concurrency = 8, maxAttempts = 3, maxRetryAfterSeconds = 60, sleep = wait } = options;
  const claimed = await claimItems(executor, shipmentId);
  let bought = 0;
  let failed = 0;
  await eachWithLimit(claimed, concurrency, async (item) => {
    const refuse = (code: LabelFailureCode, message: string): ItemResult => ({
      id: item.id,
      attempts: 0,
      outcome: { ok: false, carrierShipmentId: null, code, message },
    });
    let result: ItemResult;
    if (!carrier) result = refuse("no_carrier", "No carrier is configured for this installation; labels cannot be bought.");
    else if (!item.from_address)
      result = refuse("no_return_address", "The course has no return address to send from: set it in the course settings, then retry.");
    else if (!item.to_address) result = refuse("no_address", "This student has no shipping address yet: ask them to add one, then retry.");
    else {
      const request: LabelRequest = {
        reference: item.id,
        from: item.from_address,
        to: item.to_address,
        parcel,
        carrierShipmentId: item.carrier_shipment_id,
      };
      let attempts = 0;
      let outcome: LabelOutcome;
      for (;;) {
        outcome = await carrier.buyLabel(request);
        attempts++;
        if (outcome.ok || attempts >= maxAttempts) break;
        request.carrierShipmentId = outcome.carrierShipmentId ?? request.carrierShipmentId;
        if (outcome.code === "timeout") continue;
        if (outcome.code !== "rate_limited" || (outcome.retryAfterSeconds ?? 1) > maxRetryAfterSeconds) break;
        await sleep((outcome.retryAfterSeconds ?? 1) * 1000);
      }
      const final = outcome!;
      result = final.ok
        ? { id: item.id, attempts, outcome: final }
        : { id: item.id, attempts, outcome: { ...final, carrierShipmentId: request.carrierShipmentId } };
    }
    await saveResult(executor, result);
    if (result.outcome.ok) bought++;
    else failed++;
  });
  const { moved } = await applyBoughtLabels(executor, shipmentId);
  return { bought, failed, moved };
}

/** Kits moved into transit per transaction: one UPDATE and one e-mail batch each, well under a second. */
const MOVE_BATCH = 250;

/**
 * What a bought label does to its kit. Outbound: the kit goes into transit with its own tracking (and
 * its kit-shipped e-mail, through the outbox); return: the kit keeps the return parcel's tracking;
 * replacement: nothing on the kit (the item keeps the tracking). Only kits still waiting for it change,
 * so a second run (a retry, a crash before this step) finishes the work without repeating it.
 */
async function applyBoughtLabels(executor: Executor, shipmentId: string): Promise<{ moved: number }> {
  const [shipment] = await executor
    .select({ courseId: shipments.courseId, kind: shipments.kind, actorId: shipments.createdById })
    .from(shipments)
    .where(eq(shipments.id, shipmentId));
  if (shipment.kind === "replacement") return { moved: 0 };
  const waiting = await executor
    .select({
      kitId: shipmentItems.kitId,
      carrier: shipmentItems.carrier,
      trackingNumber: shipmentItems.trackingNumber,
      shippedOn: sql<string>`to_char(${shipmentItems.updatedAt} at time zone (select time_zone from courses where id = ${shipment.courseId}), 'YYYY-MM-DD')`,
    })
    .from(shipmentItems)
    .innerJoin(kits, eq(kits.id, shipmentItems.kitId))
    .where(
      and(
        eq(shipmentItems.shipmentId, shipmentId),
        eq(shipmentItems.status, "bought"),
        shipment.kind === "outbound"
          ? eq(kits.state, "packed")
          : sql`${kits.returnTrackingNumber} is distinct from ${shipmentItems.trackingNumber}`,
      ),
    )
    .orderBy(asc(kits.id));
  let moved = 0;
  for (let start = 0; start < waiting.length; start += MOVE_BATCH) {
    const batch = waiting.slice(start, start + MOVE_BATCH);
    const parcels: Record<string, Shipping> = Object.fromEntries(
      batch.map((item) => [item.kitId, { carrier: item.carrier!, trackingNumber: item.trackingNumber!, shippedOn: item.shippedOn }]),
    );
    if (shipment.kind === "outbound") {
      const result = await moveKits(executor, {
        courseId: shipment.courseId,
        // Null once the instructor's account is gone: the kit's history then names no one.
        actorId: shipment.actorId as string,
        kitIds: Object.keys(parcels),
        move: { to: "in_transit", shipping: parcels },
      });
      moved += result.moved;
    } else {
      const ids = Object.keys(parcels);
      const column = (pick: (shipping: Shipping) => string) =>
        sql`(case ${kits.id} ${sql.join(
          ids.map((id) => sql`when ${id}::uuid then ${pick(parcels[id])}`),
          sql` `,
        )} end)`;
      await executor
        .update(kits)
        .set({
          returnCarrier: column((s) => s.carrier),
          returnTrackingNumber: column((s) => s.trackingNumber),
          returnShippedOn: column((s) => s.shippedOn),
          updatedAt: new Date(),
        })
        .where(inArray(kits.id, ids));
      moved += ids.length;
    }
  }
  return { moved };
}

/**
 * "Retry failed": puts the shipment's failed items back in the queue and queues the job, in one
 * transaction. An item refused for its address waits until the address changed after the refusal.
 * Bought items are never touched, so pressing it twice buys nothing twice.
 */
export async function retryFailedItems(
  executor: Executor,
  { courseId, shipmentId }: { courseId: string; shipmentId: string },
): Promise<{ requeued: number; waitingForAddress: number }> {
  return executor.transaction(async (tx) => {
    // Raw: the address check joins the kit's holder to their address in the same UPDATE.
    const result = await tx.execute<{ requeued: boolean }>(sql`
      with failed as (
        select si.id,
          si.error_code not in (${sql.join(
            needsAddressFix.map((code) => sql`${code}`),
            sql`, `,
          )})
          or exists (select 1 from shipping_addresses a
                     where (a.membership_id = k.holder_membership_id or a.invitation_id = k.holder_invitation_id)
                       and a.updated_at > si.updated_at) as ready
        from shipment_items si join shipments s on s.id = si.shipment_id join kits k on k.id = si.kit_id
        where si.shipment_id = ${shipmentId} and s.course_id = ${courseId} and si.status = 'failed'
        for update of si
      ),
      requeued as (
        update shipment_items si set status = 'queued', error_code = null, error_message = null, updated_at = now()
        from failed where failed.id = si.id and failed.ready
        returning si.id
      )
      select failed.ready as requeued from failed`);
    const requeued = result.rows.filter((row) => row.requeued).length;
    if (requeued) await queueLabelPurchase(tx, shipmentId);
    return { requeued, waitingForAddress: result.rows.length - requeued };
  });
}

export type LabelStatus = (typeof shipmentItems.$inferSelect)["status"];

/** A shipment with its counts by status and one page of its items: two statements whatever its size. */
export async function getShipment(
  executor: Executor,
  { courseId, shipmentId, page, pageSize }: { courseId: string; shipmentId: string; page: number; pageSize: number },
) {
  const tally = (status: LabelStatus) => sql<number>`count(*) filter (where ${shipmentItems.status} = ${status})::int`;
  const [[shipment], items] = await Promise.all([
    executor
      .select({
        id: shipments.id,
        kind: shipments.kind,
        createdAt: shipments.createdAt,
        total: sql<number>`count(${shipmentItems.id})::int`,
        queued: tally("queued"),
        buying: tally("buying"),
        bought: tally("bought"),
        failed: tally("failed"),
      })
      .from(shipments)
      .leftJoin(shipmentItems, eq(shipmentItems.shipmentId, shipments.id))
      .where(and(eq(shipments.id, shipmentId), eq(shipments.courseId, courseId)))
      .groupBy(shipments.id),
    executor.execute<{
      id: string;
      kit_id: string;
      kit_number: string;
      kit_state: string;
      student_name: string | null;
      status: LabelStatus;
      carrier: string | null;
      service: string | null;
      tracking_number: string | null;
      error_code: LabelFailureCode | null;
      error_message: string | null;
      attempts: number;
    }>(sql`
      select si.id, si.kit_id, k.number as kit_number, k.state as kit_state, coalesce(u.name, i.name, i.email) as student_name,
        si.status, si.carrier, si.service, si.tracking_number, si.error_code, si.error_message, si.attempts
      from shipment_items si
      join shipments s on s.id = si.shipment_id
      join kits k on k.id = si.kit_id
      left join course_memberships m on m.id = k.holder_membership_id
      left join users u on u.id = m.user_id
      left join invitations i on i.id = k.holder_invitation_id
      where si.shipment_id = ${shipmentId} and s.course_id = ${courseId}
      -- Failures first: they are what needs doing.
      order by (si.status = 'failed') desc, length(k.number), k.number
      limit ${pageSize} offset ${(page - 1) * pageSize}`),
  ]);
  if (!shipment) return null;
  return {
    ...shipment,
    items: items.rows.map((row) => ({
      id: row.id,
      kitId: row.kit_id,
      kitNumber: row.kit_number,
      kitState: row.kit_state,
      studentName: row.student_name,
      status: row.status,
      carrier: row.carrier,
      service: row.service,
      trackingNumber: row.tracking_number,
      errorCode: row.error_code,
      errorMessage: row.error_message,
      attempts: row.attempts,
    })),
  };
}

/** The course's shipments, newest first, with their counts: one statement and the total in it. */
export async function listShipments(executor: Executor, courseId: string, { page, pageSize }: { page: number; pageSize: number }) {
  const tally = (status: LabelStatus) => sql<number>`count(*) filter (where ${shipmentItems.status} = ${status})::int`;
  const rows = await executor
    .select({
      id: shipments.id,
      kind: shipments.kind,
      createdAt: shipments.createdAt,
      total: sql<number>`count(${shipmentItems.id})::int`,
      bought: tally("bought"),
      failed: tally("failed"),
      shipments: sql<number>`(count(*) over ())::int`,
    })
    .from(shipments)
    .leftJoin(shipmentItems, eq(shipmentItems.shipmentId, shipments.id))
    .where(eq(shipments.courseId, courseId))
    .groupBy(shipments.id)
    .orderBy(sql`${shipments.createdAt} desc`, shipments.id)
    .limit(pageSize)
    .offset((page - 1) * pageSize);
  return { rows, total: rows[0]?.shipments ?? 0 };
}
