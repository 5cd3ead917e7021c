/**
 * Kits on their journey to a student's home and back. Every move goes through `moveKits`, which
 * checks the state machine, keeps the history and sends the kit-shipped e-mail in the same transaction.
 */
import { AppError } from "~/lib/app-error";
import { and, asc, count, desc, eq, getTableColumns, ilike, inArray, isNull, or, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import {
  cohorts,
  courseMemberships,
  courses,
  invitations,
  kitEvents,
  kitParts,
  kitProblems,
  kits,
  partEvents,
  parts,
  users,
} from "~/db/schema";
import { canMoveKit, kitStateLabels, kitStatesWithHolder, type KitState, type PartCondition } from "~/lib/kits/kit-states";
import { appUrl } from "~/server/config.server";
import type { Executor, Transaction } from "~/server/db.server";
import { sendEmails } from "~/server/email/send-email.server";
import { jsonRows, orNull } from "~/server/json-rows.server";
import { recordAudit } from "~/server/audit.server";
import { reportKitProblem } from "~/server/kits/kit-problems.server";
import { plural } from "~/lib/plural";
import { formatCalendarDay } from "~/lib/format-date";
import { inCohortOrder } from "~/server/courses/cohort-order.server";

export type Kit = typeof kits.$inferSelect;
export type Shipping = { carrier: string; trackingNumber: string; shippedOn: string };

export async function createKit(
  executor: Executor,
  {
    courseId,
    actorId,
    number,
    partIds,
    note,
  }: { courseId: string; actorId: string; number: string; partIds: string[]; note?: string | null },
): Promise<Kit> {
  return executor.transaction(async (tx) => {
    const taken = await tx
      .select({ number: kits.number })
      .from(kits)
      .where(and(eq(kits.courseId, courseId), eq(kits.number, number)));
    if (taken.length)
      throw new AppError({ code: "kit_refused", message: `Kit ${number} already exists in this course; choose another number.` });
    const [kit] = await tx.insert(kits).values({ courseId, number }).returning();
    await putPartsInKit(tx, courseId, kit.id, partIds);
    await tx
      .insert(kitEvents)
      .values({ kitId: kit.id, actorId, toState: "on_shelf", action: "created", note: note ?? null, detail: { partIds } });
    return kit;
  });
}

/** Puts parts in a kit after checking they belong to the course, are in service and (but for fluid lots) sit in no other kit. */
async function putPartsInKit(tx: Transaction, courseId: string, kitId: string, partIds: string[]): Promise<void> {
  if (partIds.length === 0) return;
  const found = await tx
    .select({
      id: parts.id,
      label: parts.label,
      kind: parts.kind,
      status: parts.status,
      diameterMm: parts.diameterMm,
      innerDiameterMm: parts.innerDiameterMm,
      inKit: kitParts.kitId,
    })
    .from(parts)
    .leftJoin(kitParts, and(eq(kitParts.partId, parts.id), eq(kitParts.exclusive, true)))
    .where(and(eq(parts.courseId, courseId), inArray(parts.id, partIds)));
  if (found.length !== new Set(partIds).size)
    throw new AppError({ code: "kit_refused", message: "Some of the chosen parts are not in this course's inventory." });
  const busy = found.filter((part) => part.inKit && part.inKit !== kitId);
  if (busy.length)
    throw new AppError({
      code: "kit_refused",
      message: `${busy.map((p) => p.label).join(", ")} already sit in another kit; take them out of it first.`,
    });
  const unusable = found.filter((part) => part.status !== "in_service");
  if (unusable.length)
    throw new AppError({
      code: "kit_refused",
      message: `${unusable.map((p) => p.label).join(", ")} are not in service (retired or waiting for re-measurement).`,
    });
  const bores = found.filter((part) => part.kind === "column").map((part) => part.innerDiameterMm!);
  const tooWide = found.filter((part) => part.kind === "sphere" && bores.some((bore) => part.diameterMm! >= bore));
  if (tooWide.length)
    throw new AppError({ code: "kit_refused", message: `${tooWide.map((p) => p.label).join(", ")} are wider than the kit's column bore.` });
  await tx
    .insert(kitParts)
    .values(found.map((part) => ({ kitId, partId: part.id, exclusive: part.kind !== "fluid_lot" })))
    .onConflictDoNothing();
}

/** Whom a kit is packed for: a student of the course, or an invited student who has not accepted yet. */
export type KitHolder = { membershipId: string; invitationId?: never } | { invitationId: string; membershipId?: never };

export type KitMove = {
  to: KitState;
  note?: string | null;
  /** The student a kit is packed for (packing one kit)… */
  holderMembershipId?: string;
  /** …or, packing many kits at once, each kit's own student by kit id. */
  holders?: Record<string, KitHolder>;
  /**
   * The parcel's carrier, tracking number and date: required when kits go into transit, kept as the
   * return parcel's when they are coming back. One for every kit, or one per kit id.
   */
  shipping?: Shipping | Record<string, Shipping>;
};

const isOneShipping = (shipping: KitMove["shipping"]): shipping is Shipping =>
  typeof shipping?.trackingNumber === "string" && typeof shipping.carrier === "string";

/** Each kit's parcel under a move, or null when the move names none for it. */
function shippingOf(move: KitMove, kitId: string): Shipping | null {
  if (!move.shipping) return null;
  return isOneShipping(move.shipping) ? move.shipping : (move.shipping[kitId] ?? null);
}

function holderOf(move: KitMove, kitId: string): KitHolder | null {
  if (move.holders) return move.holders[kitId] ?? null;
  return move.holderMembershipId ? { membershipId: move.holderMembershipId } : null;
}

/** The value of a kit column that differs per kit, as one CASE over the ids (one UPDATE for all kits). */
export function perKit(kitIds: string[], value: (kitId: string) => string | null): SQL {
  return sql`(case ${kits.id} ${sql.join(
    kitIds.map((id) => sql`when ${id}::uuid then ${value(id)}`),
    sql` `,
  )} end)`;
}

/**
 * Moves one or many kits in one transaction: all move or none do, and each move is kept as history.
 * Rows are locked in id order so that two bulk moves over overlapping kits cannot deadlock.
 */
export async function moveKits(
  executor: Executor,
  { courseId, actorId, kitIds, move }: { courseId: string; actorId: string; kitIds: string[]; move: KitMove },
): Promise<{ moved: number }> {
  if (kitIds.length === 0) return { moved: 0 };
  return executor.transaction(async (tx) => {
    const current = await tx
      .select()
      .from(kits)
      .where(and(eq(kits.courseId, courseId), inArray(kits.id, kitIds)))
      .orderBy(asc(kits.id))
      .for("update");
    if (current.length !== new Set(kitIds).size)
      throw new AppError({ code: "kit_refused", message: "Some of the chosen kits are not in this course." });
    const refused = current.filter((kit) => !canMoveKit(kit.state, move.to));
    if (refused.length) {
      throw new AppError({
        code: "kit_refused",
        message: `${refused.map((kit) => `Kit ${kit.number} (${kitStateLabels[kit.state].toLowerCase()})`).join(", ")} cannot go to ${kitStateLabels[move.to].toLowerCase()}.`,
      });
    }
    if (move.to === "packed") await checkHolders(tx, courseId, current, move);
    const unshipped = move.to === "in_transit" ? current.filter((kit) => !shippingOf(move, kit.id)) : [];
    if (unshipped.length)
      throw new AppError({
        code: "kit_refused",
        message: `Give the carrier, tracking number and date before marking ${unshipped.map((kit) => `kit ${kit.number}`).join(", ")} in transit.`,
      });
    if (move.to === "in_transit" && current.some((kit) => !kit.holderMembershipId && !kit.holderInvitationId)) {
      throw new AppError({ code: "kit_refused", message: "Pack a kit for a student before shipping it." });
    }

    const ids = current.map((kit) => kit.id);
    const shipped = ids.filter((id) => shippingOf(move, id));
    const parcelColumns = (prefix: "outbound" | "return") => {
      if (shipped.length === 0) return {};
      const column = (pick: (shipping: Shipping) => string) =>
        perKit(ids, (id) => {
          const shipping = shippingOf(move, id);
          return shipping ? pick(shipping) : null;
        });
      const values = {
        carrier: column((s) => s.carrier),
        trackingNumber: column((s) => s.trackingNumber),
        shippedOn: column((s) => s.shippedOn),
      };
      return prefix === "outbound"
        ? values
        : { returnCarrier: values.carrier, returnTrackingNumber: values.trackingNumber, returnShippedOn: values.shippedOn };
    };
    const holderAfter = (kit: Kit) =>
      move.to === "packed"
        ? (holderOf(move, kit.id)!.membershipId ?? null)
        : kitStatesWithHolder.includes(move.to)
          ? kit.holderMembershipId
          : null;
    const packedHolder = (pick: (holder: KitHolder) => string | undefined) =>
      sql`${perKit(ids, (id) => pick(holderOf(move, id)!) ?? null)}::uuid`;
    await tx
      .update(kits)
      .set({
        state: move.to,
        ...(move.to === "packed"
          ? {
              holderMembershipId: packedHolder((holder) => holder.membershipId),
              holderInvitationId: packedHolder((holder) => holder.invitationId),
            }
          : kitStatesWithHolder.includes(move.to)
            ? {}
            : { holderMembershipId: null, holderInvitationId: null }),
        ...(move.to === "in_transit" ? parcelColumns("outbound") : {}),
        ...(move.to === "coming_back" ? parcelColumns("return") : {}),
        ...(move.to === "on_shelf"
          ? { carrier: null, trackingNumber: null, shippedOn: null, returnCarrier: null, returnTrackingNumber: null, returnShippedOn: null }
          : {}),
        updatedAt: new Date(),
      })
      .where(inArray(kits.id, ids));
    await tx.insert(kitEvents).values(
      current.map((kit) => {
        const shipping = shippingOf(move, kit.id);
        return {
          kitId: kit.id,
          actorId,
          fromState: kit.state,
          toState: move.to,
          action: "moved",
          note: move.note ?? null,
          detail: { holderMembershipId: holderAfter(kit), ...(shipping ? { shipping } : {}) },
        };
      }),
    );
    // Each kit's move in the course's audit log too, in the same transaction and one statement for all of them.
    await recordAudit(
      tx,
      current.map((kit) => ({
        action: "kit.moved" as const,
        actorId,
        courseId,
        subject: `kit:${kit.id}`,
        detail: { from: kit.state, to: move.to },
      })),
    );
    if (move.to === "in_transit") await queueShippedEmails(tx, courseId, current, move);
    return { moved: current.length };
  });
}

/** Each kit goes to its own student, who holds no other kit: checked for all kits in two statements. */
async function checkHolders(tx: Transaction, courseId: string, current: Kit[], move: KitMove): Promise<void> {
  const holders = current.map((kit) => holderOf(move, kit.id));
  if (holders.some((holder) => !holder)) throw new AppError({ code: "kit_refused", message: "Choose the student the kit is packed for." });
  const membershipIds = holders.flatMap((holder) => (holder!.membershipId ? [holder!.membershipId] : []));
  const invitationIds = holders.flatMap((holder) => (holder!.invitationId ? [holder!.invitationId] : []));
  if (new Set(membershipIds).size + new Set(invitationIds).size !== current.length)
    throw new AppError({ code: "kit_refused", message: "Pack one kit per student: each kit goes to its own student." });
  // A kit coming back does not count, as in the one-kit-per-student index.
  const active = sql`${kits.state} <> 'coming_back'`;
  // One after the other: a transaction's client runs one statement at a time.
  const members = membershipIds.length
    ? await tx
        .select({
          eligible: sql<boolean>`${courseMemberships.role} = 'student' and ${courseMemberships.removedAt} is null`,
          kitNumber: kits.number,
        })
        .from(courseMemberships)
        .leftJoin(kits, and(eq(kits.holderMembershipId, courseMemberships.id), active))
        .where(and(eq(courseMemberships.courseId, courseId), inArray(courseMemberships.id, membershipIds)))
    : [];
  const invited = invitationIds.length
    ? await tx
        .select({
          eligible: sql<boolean>`${invitations.role} = 'student' and ${invitations.acceptedAt} is null and ${invitations.revokedAt} is null and ${invitations.replacedById} is null`,
          kitNumber: kits.number,
        })
        .from(invitations)
        .leftJoin(kits, and(eq(kits.holderInvitationId, invitations.id), active))
        .where(and(eq(invitations.courseId, courseId), inArray(invitations.id, invitationIds)))
    : [];
  const found = [...members, ...invited];
  if (found.length !== current.length || found.some((holder) => !holder.eligible))
    throw new AppError({ code: "kit_refused", message: "Kits are packed for students of this course only." });
  const held = found.flatMap((holder) => (holder.kitNumber ? [holder.kitNumber] : []));
  if (held.length)
    throw new AppError({
      code: "kit_refused",
      message: `${plural(held.length, "This student already holds kit", "These students already hold kits")} ${held.join(", ")}; one kit per student.`,
    });
}

async function queueShippedEmails(tx: Transaction, courseId: string, shipped: Kit[], move: KitMove): Promise<void> {
  const recipients = await tx
    .select({
      kitId: kits.id,
      kitNumber: kits.number,
      // An invited student who has not accepted yet is written to at the invitation's address.
      email: sql<string>`coalesce(${users.email}, ${invitations.email})`,
      name: sql<string | null>`coalesce(${users.name}, ${invitations.name})`,
      courseTitle: courses.title,
    })
    .from(kits)
    .leftJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
    .leftJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(invitations, eq(invitations.id, kits.holderInvitationId))
    .innerJoin(courses, eq(courses.id, kits.courseId))
    .where(
      inArray(
        kits.id,
        shipped.map((kit) => kit.id),
      ),
    );
  await sendEmails(
    tx,
    recipients.map((recipient) => {
      const shipping = shippingOf(move, recipient.kitId)!;
      return {
        to: recipient.email,
        toName: recipient.name,
        template: "kit-shipped" as const,
        courseId,
        props: {
          courseTitle: recipient.courseTitle,
          kitNumber: recipient.kitNumber,
          carrier: shipping.carrier,
          trackingNumber: shipping.trackingNumber,
          shippedOn: formatCalendarDay(shipping.shippedOn),
          kitUrl: `${appUrl()}/courses/${courseId}/my-kit`,
        },
      };
    }),
  );
}

/** One kit back on the bench: the condition of every part, and the parts to send for re-measurement. */
export type KitCheckIn = { kitId: string; conditions: Record<string, PartCondition>; remeasure: string[] };

/**
 * Checking kits in, all in one transaction: every part of every kit needs its condition, given
 * explicitly (no part is taken as fine by default), so a damaged or missing part cannot be skipped. A
 * damaged or missing part leaves its kit, and a sphere or column is taken out of service; a part can be
 * sent for re-measurement. Holders are released. A constant number of statements whatever the number of kits.
 */
export async function checkInKits(
  executor: Executor,
  { courseId, actorId, kits: checkIns, note }: { courseId: string; actorId: string; kits: KitCheckIn[]; note?: string | null },
): Promise<{ checkedIn: number }> {
  if (checkIns.length === 0) throw new AppError({ code: "kit_refused", message: "Choose the kits to check in." });
  const kitIds = checkIns.map((kit) => kit.kitId);
  const checkInOf = new Map(checkIns.map((kit) => [kit.kitId, kit]));
  return executor.transaction(async (tx) => {
    await moveKits(tx, { courseId, actorId, kitIds, move: { to: "checked_in", note } });
    const inKits = await tx
      .select({ kitId: kitParts.kitId, kitNumber: kits.number, partId: kitParts.partId, exclusive: kitParts.exclusive })
      .from(kitParts)
      .innerJoin(kits, eq(kits.id, kitParts.kitId))
      .where(inArray(kitParts.kitId, kitIds));
    const pair = (kitId: string, partId: string) => `${kitId}:${partId}`;
    const inKitPairs = new Set(inKits.map((row) => pair(row.kitId, row.partId)));
    const named = checkIns.flatMap((kit) => [...Object.keys(kit.conditions), ...kit.remeasure].map((partId) => pair(kit.kitId, partId)));
    if (named.some((key) => !inKitPairs.has(key)))
      throw new AppError({
        code: "kit_refused",
        message: "The check-in names parts that are not in the kit; reload the page and try again.",
      });
    const conditionOf = (row: (typeof inKits)[number]) => checkInOf.get(row.kitId)?.conditions[row.partId];
    const unrecorded = inKits.filter((row) => !conditionOf(row));
    if (unrecorded.length)
      throw new AppError({
        code: "kit_refused",
        message: `Record the condition of every part: ${[...new Set(unrecorded.map((row) => `kit ${row.kitNumber}`))].join(", ")} has parts without one.`,
      });
    const lost = inKits.filter((row) => conditionOf(row) !== "fine");
    const lostPairs = new Set(lost.map((row) => pair(row.kitId, row.partId)));
    const remeasured = new Set(
      checkIns.flatMap((kit) => kit.remeasure.map((partId) => pair(kit.kitId, partId))).filter((key) => !lostPairs.has(key)),
    );
    const toRemeasure = inKits.filter((row) => remeasured.has(pair(row.kitId, row.partId)));
    // A broken sphere or column is retired; a spilled bottle leaves the rest of its fluid lot in service.
    const retired = lost.filter((row) => row.exclusive).map((row) => row.partId);
    if (retired.length) await tx.update(parts).set({ status: "retired", updatedAt: new Date() }).where(inArray(parts.id, retired));
    if (lost.length) {
      // By (kit, part): a fluid lot lost from one kit stays in the others.
      const pairs = sql.join(
        lost.map((row) => sql`(${row.kitId}::uuid, ${row.partId}::uuid)`),
        sql`, `,
      );
      await tx.delete(kitParts).where(sql`(${kitParts.kitId}, ${kitParts.partId}) in (${pairs})`);
    }
    if (toRemeasure.length)
      await tx
        .update(parts)
        .set({ status: "remeasure", updatedAt: new Date() })
        .where(inArray(parts.id, [...new Set(toRemeasure.map((row) => row.partId))]));
    if (inKits.length)
      await tx.insert(partEvents).values(
        inKits.map((row) => ({
          partId: row.partId,
          actorId,
          action: "checked_in",
          detail: {
            kitId: row.kitId,
            condition: conditionOf(row)!,
            remeasure: remeasured.has(pair(row.kitId, row.partId)),
          },
        })),
      );
    await tx.insert(kitEvents).values(
      checkIns.map((kit) => ({
        kitId: kit.kitId,
        actorId,
        action: "checked_in",
        note: note ?? null,
        detail: {
          conditions: kit.conditions,
          remeasure: toRemeasure.filter((item) => item.kitId === kit.kitId).map((item) => item.partId),
        },
      })),
    );
    return { checkedIn: checkIns.length };
  });
}

/** The student confirms the parcel arrived (and whether it was complete). */
export async function confirmArrival(
  executor: Executor,
  {
    courseId,
    actorId,
    kitId,
    complete,
    note,
  }: { courseId: string; actorId: string; kitId: string; complete: boolean; note?: string | null },
): Promise<void> {
  await executor.transaction(async (tx) => {
    await moveKits(tx, { courseId, actorId, kitIds: [kitId], move: { to: "at_home", note } });
    if (!complete)
      await reportKitProblem(tx, {
        courseId,
        kitId,
        actorId,
        partId: null,
        problem: "incomplete",
        note: note || "The parcel arrived incomplete.",
      });
  });
}

export type KitListQuery = { state?: KitState; cohortIds?: string[]; search?: string; page: number; pageSize: number };

/** One page of kits with their holder and cohort, and the total: two statements whatever the size. */
export async function listKits(executor: Executor, courseId: string, query: KitListQuery) {
  const filters: SQL[] = [eq(kits.courseId, courseId)];
  if (query.state) filters.push(eq(kits.state, query.state));
  if (query.cohortIds) filters.push(query.cohortIds.length ? inArray(courseMemberships.cohortId, query.cohortIds) : sql`false`);
  if (query.search) {
    const pattern = `%${query.search.replace(/[%_\\]/g, "\\$&")}%`;
    filters.push(or(ilike(kits.number, pattern), ilike(users.name, pattern), ilike(users.email, pattern))!);
  }
  const where = and(...filters);
  const base = () =>
    executor
      .select({
        id: kits.id,
        number: kits.number,
        state: kits.state,
        carrier: kits.carrier,
        trackingNumber: kits.trackingNumber,
        shippedOn: kits.shippedOn,
        returnCarrier: kits.returnCarrier,
        returnTrackingNumber: kits.returnTrackingNumber,
        returnShippedOn: kits.returnShippedOn,
        updatedAt: kits.updatedAt,
        holderName: users.name,
        holderEmail: users.email,
        cohortName: cohorts.name,
        partCount: sql<number>`(select count(*)::int from ${kitParts} where ${kitParts.kitId} = ${kits.id})`,
        openReports: sql<number>`(select count(*)::int from ${kitProblems} where ${kitProblems.kitId} = ${kits.id} and ${kitProblems.status} <> 'resolved')`,
      })
      .from(kits)
      .leftJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
      .leftJoin(users, eq(users.id, courseMemberships.userId))
      .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId));
  const [rows, [{ total }]] = await Promise.all([
    base()
      .where(where)
      .orderBy(sql`length(${kits.number})`, asc(kits.number))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    executor
      .select({ total: count() })
      .from(kits)
      .leftJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
      .leftJoin(users, eq(users.id, courseMemberships.userId))
      .where(where),
  ]);
  return { rows, total };
}

/** A kit with its parts, holder and history, for the kit page, the packing slip and "My kit": one statement. */
export async function getKit(executor: Executor, courseId: string, kitId: string) {
  const actor = alias(users, "actor");
  const contents = jsonRows(
    { ...getTableColumns(kitParts), part: getTableColumns(parts) },
    sql`from ${kitParts} join ${parts} on ${parts.id} = ${kitParts.partId} where ${kitParts.kitId} = ${kits.id}`,
  );
  const history = jsonRows(
    { ...getTableColumns(kitEvents), actor: orNull({ name: actor.name }, actor.id) },
    sql`from ${kitEvents} left join ${users} ${actor} on ${actor.id} = ${kitEvents.actorId} where ${kitEvents.kitId} = ${kits.id}`,
    sql`${kitEvents.createdAt} desc`,
  );
  const [row] = await executor
    .select({
      kit: kits,
      holder: courseMemberships,
      user: { id: users.id, name: users.name, email: users.email, studentNumber: users.studentNumber },
      cohort: cohorts,
      parts: contents.column,
      events: history.column,
    })
    .from(kits)
    .leftJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
    .leftJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
    .where(and(eq(kits.id, kitId), eq(kits.courseId, courseId)));
  if (!row) return null;
  return {
    ...row.kit,
    holder: row.holder && row.user ? { ...row.holder, user: row.user, cohort: row.cohort } : null,
    parts: contents.read(row.parts),
    events: history.read(row.events),
  };
}

/** The kit a student holds in a course, if any: a kit still coming back gives way to a new one sent since. */
export async function findKitOfMember(executor: Executor, membershipId: string): Promise<{ id: string; courseId: string } | null> {
  const [kit] = await executor
    .select({ id: kits.id, courseId: kits.courseId })
    .from(kits)
    .where(eq(kits.holderMembershipId, membershipId))
    .orderBy(sql`${kits.state} = 'coming_back'`, desc(kits.updatedAt))
    .limit(1);
  return kit ?? null;
}

/** Parts that can go into a new kit: in service and in no kit; fluid lots in service (they fill many kits). */
export async function listAvailableParts(executor: Executor, courseId: string) {
  return executor
    .select({
      id: parts.id,
      kind: parts.kind,
      label: parts.label,
      material: parts.material,
      diameterMm: parts.diameterMm,
      fluidName: parts.fluidName,
      accessoryType: parts.accessoryType,
      innerDiameterMm: parts.innerDiameterMm,
    })
    .from(parts)
    .leftJoin(kitParts, and(eq(kitParts.partId, parts.id), eq(kitParts.exclusive, true)))
    .where(and(eq(parts.courseId, courseId), eq(parts.status, "in_service"), isNull(kitParts.kitId)))
    .orderBy(asc(parts.kind), asc(parts.label));
}

/** Students of the course who hold no kit: the people a kit can be packed for. */
export async function listStudentsWithoutKit(executor: Executor, courseId: string) {
  return executor
    .select({ membershipId: courseMemberships.id, name: users.name, email: users.email, cohortName: cohorts.name })
    .from(courseMemberships)
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
    .leftJoin(kits, eq(kits.holderMembershipId, courseMemberships.id))
    .where(
      and(
        eq(courseMemberships.courseId, courseId),
        eq(courseMemberships.role, "student"),
        isNull(courseMemberships.removedAt),
        isNull(kits.id),
      ),
    )
    .orderBy(...inCohortOrder, asc(users.name));
}
