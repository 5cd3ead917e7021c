/**
 * A student's problem with their kit, followed to the end. A report becomes a problem the instructors
 * are e-mailed about; each change of its status (the rule is in app/lib/kits/kit-problem-states.ts)
 * is kept with a note to the student, who is e-mailed through the outbox. A replacement part is sent
 * from the problem: it takes the reported part's place in the kit, and its parcel's tracking is kept
 * on a shipment item for the problem.
 */
import { and, asc, count, desc, eq, getTableColumns, inArray, isNull, ne, or, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import {
  cohorts,
  courseMemberships,
  courses,
  kitEvents,
  kitParts,
  kitProblems,
  kitProblemUpdates,
  kits,
  partEvents,
  parts,
  shipmentItems,
  shipments,
  users,
  type KitProblemUpdateDetail,
} from "~/db/schema";
import { AppError } from "~/lib/app-error";
import {
  canChangeProblem,
  kitProblemStatusLabels,
  openProblemStatuses,
  type KitProblemKind,
  type KitProblemStatus,
} from "~/lib/kits/kit-problem-states";
import { appUrl } from "~/server/config.server";
import type { Executor, Transaction } from "~/server/db.server";
import { sendEmails } from "~/server/email/send-email.server";
import { jsonRows, orNull } from "~/server/json-rows.server";

type KitProblemPartKind = (typeof parts.$inferSelect)["kind"];

const refused = (message: string, field?: string, status = 400) => new AppError({ code: "kit_problem_refused", message, field, status });

/** Kit states in which the kit is on its way to or at the student's home: the only ones a part can be sent to. */
const kitStatesAtStudent = ["in_transit", "at_home"] as const;

/**
 * A student reports a missing or damaged part (or an incomplete parcel): one transaction makes the
 * problem and its first update, keeps the report on the kit's history and e-mails the instructors.
 */
export async function reportKitProblem(
  executor: Executor,
  {
    courseId,
    kitId,
    actorId,
    partId,
    problem,
    note,
  }: { courseId: string; kitId: string; actorId: string; partId: string | null; problem: KitProblemKind; note: string },
): Promise<{ problemId: string }> {
  return executor.transaction(async (tx) => {
    const [context] = await tx
      .select({
        kitNumber: kits.number,
        holderMembershipId: kits.holderMembershipId,
        courseTitle: courses.title,
        studentName: users.name,
        partLabel: parts.label,
      })
      .from(kits)
      .innerJoin(courses, eq(courses.id, kits.courseId))
      .innerJoin(users, eq(users.id, actorId))
      .leftJoin(parts, partId ? eq(parts.id, partId) : sql`false`)
      .where(and(eq(kits.id, kitId), eq(kits.courseId, courseId)));
    if (!context) throw refused("That kit is not in this course.", undefined, 404);
    const [created] = await tx
      .insert(kitProblems)
      .values({ courseId, kitId, membershipId: context.holderMembershipId, reportedById: actorId, partId, kind: problem, note })
      .returning({ id: kitProblems.id });
    await tx.insert(kitProblemUpdates).values({ problemId: created.id, actorId, fromStatus: null, toStatus: "received" });
    await tx.insert(kitEvents).values({ kitId, actorId, action: "reported", note, detail: { partId, problem } });
    const instructors = await tx
      .select({ email: users.email, name: users.name })
      .from(courseMemberships)
      .innerJoin(users, eq(users.id, courseMemberships.userId))
      .where(and(eq(courseMemberships.courseId, courseId), eq(courseMemberships.role, "instructor"), isNull(courseMemberships.removedAt)));
    const { kitNumber, courseTitle, studentName, partLabel } = context;
    await sendEmails(
      tx,
      instructors.map((instructor) => ({
        to: instructor.email,
        toName: instructor.name,
        template: "kit-problem" as const,
        courseId,
        props: {
          kitNumber,
          courseTitle,
          studentName,
          partLabel,
          problem,
          note,
          kitUrl: `${appUrl()}/courses/${courseId}/kits/problems/${created.id}`,
        },
      })),
    );
    return { problemId: created.id };
  });
}

/** The problem locked for a change, with what the student's e-mail and the replacement need: one statement. */
async function lockProblem(tx: Transaction, courseId: string, problemId: string) {
  const reported = alias(parts, "reported_part");
  const student = alias(users, "student");
  const [problem] = await tx
    .select({
      id: kitProblems.id,
      kitId: kitProblems.kitId,
      status: kitProblems.status,
      partId: kitProblems.partId,
      kind: kitProblems.kind,
      kitNumber: kits.number,
      kitState: kits.state,
      courseTitle: courses.title,
      partLabel: reported.label,
      partKind: reported.kind,
      studentEmail: student.email,
      studentName: student.name,
    })
    .from(kitProblems)
    .innerJoin(kits, eq(kits.id, kitProblems.kitId))
    .innerJoin(courses, eq(courses.id, kitProblems.courseId))
    .leftJoin(reported, eq(reported.id, kitProblems.partId))
    .leftJoin(courseMemberships, eq(courseMemberships.id, kitProblems.membershipId))
    .leftJoin(student, eq(student.id, courseMemberships.userId))
    .where(and(eq(kitProblems.id, problemId), eq(kitProblems.courseId, courseId)))
    .for("update", { of: kitProblems });
  if (!problem) throw refused("That problem is not in this course.", undefined, 404);
  return problem;
}
type LockedProblem = Awaited<ReturnType<typeof lockProblem>>;

type Change = {
  actorId: string;
  to: KitProblemStatus;
  note: string;
  detail?: KitProblemUpdateDetail;
  replacement?: { partId: string; label: string; carrier: string | null; trackingNumber: string | null };
};

/** Keeps one change of status with its note, and e-mails the student about it once (the update's id is the outbox key). */
async function recordChange(tx: Transaction, courseId: string, problem: LockedProblem, change: Change): Promise<void> {
  if (!canChangeProblem(problem.status, change.to))
    throw refused(
      `This problem is ${kitProblemStatusLabels[problem.status].toLowerCase()}; it cannot become ${kitProblemStatusLabels[change.to].toLowerCase()}.`,
    );
  await tx
    .update(kitProblems)
    .set({ status: change.to, updatedAt: new Date(), ...(change.replacement ? { replacementPartId: change.replacement.partId } : {}) })
    .where(eq(kitProblems.id, problem.id));
  const [update] = await tx
    .insert(kitProblemUpdates)
    .values({
      problemId: problem.id,
      actorId: change.actorId,
      fromStatus: problem.status,
      toStatus: change.to,
      note: change.note,
      detail: change.detail ?? {},
    })
    .returning({ id: kitProblemUpdates.id });
  // A problem whose student has left the course is still followed; there is nobody to tell.
  if (!problem.studentEmail) return;
  await sendEmails(tx, [
    {
      to: problem.studentEmail,
      toName: problem.studentName,
      template: "kit-problem-update",
      courseId,
      dedupeKey: `kit-problem-update:${update.id}`,
      props: {
        courseTitle: problem.courseTitle,
        kitNumber: problem.kitNumber,
        partLabel: problem.partLabel,
        status: change.to,
        note: change.note,
        replacementLabel: change.replacement?.label ?? null,
        carrier: change.replacement?.carrier ?? null,
        trackingNumber: change.replacement?.trackingNumber ?? null,
        kitUrl: `${appUrl()}/courses/${courseId}/my-kit`,
      },
    },
  ]);
}

/** An instructor changes a problem's status by hand (resolving it), with a note to the student. */
export async function changeProblemStatus(
  executor: Executor,
  { courseId, actorId, problemId, to, note }: { courseId: string; actorId: string; problemId: string; to: KitProblemStatus; note: string },
): Promise<void> {
  if (to === "replacement_sent") throw refused("Send the replacement part below: the problem then shows it as sent.", "to");
  await executor.transaction(async (tx) => {
    const problem = await lockProblem(tx, courseId, problemId);
    await recordChange(tx, courseId, problem, { actorId, to, note });
  });
}

/**
 * Sends a replacement part from the shelf for a problem, in one transaction: the part must be of the
 * reported part's kind, in service and in no kit (a fluid lot: with a bottle in stock, which it takes);
 * it goes into the kit in the reported part's place. A broken or lost sphere, column or accessory is
 * retired, as a check-in does; a fluid lot stays in service. The parcel's carrier and tracking number
 * are kept as a replacement shipment for the problem, and the problem becomes "Replacement sent".
 * The same `requestKey` again finds the replacement already sent and changes nothing.
 */
export async function sendReplacement(
  executor: Executor,
  {
    courseId,
    actorId,
    problemId,
    replacementPartId,
    carrier,
    trackingNumber,
    requestKey,
    note,
  }: {
    courseId: string;
    actorId: string;
    problemId: string;
    replacementPartId: string;
    carrier: string;
    trackingNumber: string;
    requestKey: string;
    note: string;
  },
): Promise<void> {
  await executor.transaction(async (tx) => {
    const problem = await lockProblem(tx, courseId, problemId);
    // The same form sent again (a double click, a resend after a lost answer) finds its replacement sent.
    const [sent] = await tx
      .select({ id: shipments.id })
      .from(shipments)
      .where(and(eq(shipments.courseId, courseId), eq(shipments.requestKey, requestKey)));
    if (sent) return;
    if (!canChangeProblem(problem.status, "replacement_sent"))
      throw refused(`This problem is ${kitProblemStatusLabels[problem.status].toLowerCase()}: no replacement can be sent from it now.`);
    if (!(kitStatesAtStudent as readonly string[]).includes(problem.kitState))
      throw refused(`Kit ${problem.kitNumber} is not with the student any more; a replacement goes to a kit at their home.`);
    const replacement = await findReplacement(tx, courseId, problem, replacementPartId);

    const reportedLeaves = problem.partId !== null && problem.partId !== replacement.id;
    if (reportedLeaves) {
      await tx.delete(kitParts).where(and(eq(kitParts.kitId, problem.kitId), eq(kitParts.partId, problem.partId!)));
      if (problem.partKind !== "fluid_lot")
        await tx.update(parts).set({ status: "retired", updatedAt: new Date() }).where(eq(parts.id, problem.partId!));
    }
    await tx
      .insert(kitParts)
      .values({ kitId: problem.kitId, partId: replacement.id, exclusive: replacement.kind !== "fluid_lot" })
      .onConflictDoNothing();
    if (replacement.bottlesOnHand !== null)
      await tx
        .update(parts)
        .set({ bottlesOnHand: sql`${parts.bottlesOnHand} - 1`, updatedAt: new Date() })
        .where(eq(parts.id, replacement.id));
    await tx.insert(partEvents).values([
      { partId: replacement.id, actorId, action: "replacement_sent", note, detail: { kitId: problem.kitId } },
      ...(reportedLeaves
        ? [
            {
              partId: problem.partId!,
              actorId,
              action: "replaced",
              note: null,
              detail: { kitId: problem.kitId, condition: conditionOf(problem.kind) },
            },
          ]
        : []),
    ]);
    await tx.insert(kitEvents).values({
      kitId: problem.kitId,
      actorId,
      action: "part_replaced",
      note,
      detail: { partId: problem.partId, partIds: [replacement.id] },
    });
    const [shipment] = await tx
      .insert(shipments)
      .values({ courseId, kind: "replacement", requestKey, createdById: actorId })
      .returning({ id: shipments.id });
    const [item] = await tx
      .insert(shipmentItems)
      .values({ shipmentId: shipment.id, kitId: problem.kitId, problemId, status: "bought", carrier, trackingNumber })
      .returning({ id: shipmentItems.id });
    await recordChange(tx, courseId, problem, {
      actorId,
      to: "replacement_sent",
      note,
      detail: { replacementPartId: replacement.id, shipmentItemId: item.id },
      replacement: { partId: replacement.id, label: replacement.label, carrier, trackingNumber },
    });
  });
}

const conditionOf = (kind: KitProblemKind) => (kind === "missing" ? ("missing" as const) : ("damaged" as const));

/** The kit's narrowest column bore and widest sphere, leaving out the reported part: what a replacement must fit. */
function kitFit({ kitId, partId }: { kitId: string; partId: string | null }) {
  const extreme = (aggregate: "min" | "max", column: "inner_diameter_mm" | "diameter_mm", kind: "column" | "sphere") =>
    sql<number | null>`(select ${sql.raw(`${aggregate}(p.${column})`)} from kit_parts kp join parts p on p.id = kp.part_id
      where kp.kit_id = ${kitId} and p.kind = ${kind} and p.id is distinct from ${partId}::uuid)`;
  return { kitBoreMm: extreme("min", "inner_diameter_mm", "column"), kitSphereMm: extreme("max", "diameter_mm", "sphere") };
}

/** The chosen replacement, checked against the problem and the shelf: one statement. */
async function findReplacement(tx: Transaction, courseId: string, problem: LockedProblem, partId: string) {
  const [part] = await tx
    .select({
      id: parts.id,
      label: parts.label,
      kind: parts.kind,
      status: parts.status,
      bottlesOnHand: parts.bottlesOnHand,
      diameterMm: parts.diameterMm,
      innerDiameterMm: parts.innerDiameterMm,
      inKitNumber: kits.number,
      ...kitFit(problem),
    })
    .from(parts)
    .leftJoin(kitParts, and(eq(kitParts.partId, parts.id), eq(kitParts.exclusive, true)))
    .leftJoin(kits, eq(kits.id, kitParts.kitId))
    .where(and(eq(parts.id, partId), eq(parts.courseId, courseId)))
    .for("update", { of: parts });
  const field = "replacementPartId";
  if (!part) throw refused("That part is not in this course's inventory.", field);
  if (problem.partKind && part.kind !== problem.partKind)
    throw refused(`${part.label} is not of the reported part's kind; choose a ${problem.partKind.replace("_", " ")}.`, field);
  if (part.id === problem.partId && part.kind !== "fluid_lot")
    throw refused(`${part.label} is the reported part itself; choose another from the shelf.`, field);
  if (part.inKitNumber) throw refused(`${part.label} already sits in kit ${part.inKitNumber}; choose a part from the shelf.`, field);
  if (part.status !== "in_service") throw refused(`${part.label} is not in service (retired or waiting for re-measurement).`, field);
  if (part.bottlesOnHand !== null && part.bottlesOnHand < 1) throw refused(`${part.label} has no filled bottle on the shelf.`, field);
  if (part.kind === "sphere" && part.kitBoreMm !== null && part.diameterMm! >= part.kitBoreMm)
    throw refused(`${part.label} is wider than the kit's column bore.`, field);
  if (part.kind === "column" && part.kitSphereMm !== null && part.innerDiameterMm! <= part.kitSphereMm)
    throw refused(`${part.label}'s bore is too narrow for the kit's sphere.`, field);
  return part;
}

/**
 * Parts that can replace the reported one: of its kind (any, when none was named), in service, in no
 * kit, fitting the kit's column or spheres; fluid lots with stock. One statement.
 */
export async function listReplacementCandidates(
  executor: Executor,
  courseId: string,
  problem: { kitId: string; partId: string | null; partKind: KitProblemPartKind | null },
) {
  const fit = kitFit(problem);
  return executor
    .select(getTableColumns(parts))
    .from(parts)
    .leftJoin(kitParts, and(eq(kitParts.partId, parts.id), eq(kitParts.exclusive, true)))
    .where(
      and(
        eq(parts.courseId, courseId),
        eq(parts.status, "in_service"),
        isNull(kitParts.kitId),
        or(isNull(parts.bottlesOnHand), sql`${parts.bottlesOnHand} > 0`),
        problem.partKind ? eq(parts.kind, problem.partKind) : undefined,
        sql`(${parts.kind} <> 'sphere' or ${fit.kitBoreMm} is null or ${parts.diameterMm} < ${fit.kitBoreMm})`,
        sql`(${parts.kind} <> 'column' or ${fit.kitSphereMm} is null or ${parts.innerDiameterMm} > ${fit.kitSphereMm})`,
      ),
    )
    .orderBy(asc(parts.kind), asc(parts.label))
    .limit(300);
}

/** A problem's updates (oldest first, with who made them) and its replacement parcels (newest first), as subqueries of one statement. */
function problemChildren() {
  const actor = alias(users, "update_actor");
  return {
    updates: jsonRows(
      { ...getTableColumns(kitProblemUpdates), actor: orNull({ name: actor.name }, actor.id) },
      sql`from ${kitProblemUpdates} left join ${users} ${actor} on ${actor.id} = ${kitProblemUpdates.actorId} where ${kitProblemUpdates.problemId} = ${kitProblems.id}`,
      sql`${kitProblemUpdates.createdAt}`,
    ),
    parcels: jsonRows(
      { id: shipmentItems.id, status: shipmentItems.status, carrier: shipmentItems.carrier, trackingNumber: shipmentItems.trackingNumber },
      sql`from ${shipmentItems} where ${shipmentItems.problemId} = ${kitProblems.id}`,
      sql`${shipmentItems.createdAt} desc`,
    ),
  };
}

const reportedPart = alias(parts, "reported_part");
const replacementPart = alias(parts, "replacement_part");
const student = alias(users, "student");

/** Problems with their history and parcels, for the student's kit page and the instructors' kit page: one statement. */
export async function listKitProblems(
  executor: Executor,
  courseId: string,
  whose: { membershipId: string } | { kitId: string; openOnly: true },
) {
  const children = problemChildren();
  const rows = await executor
    .select({
      problem: kitProblems,
      partLabel: reportedPart.label,
      replacementLabel: replacementPart.label,
      updates: children.updates.column,
      parcels: children.parcels.column,
    })
    .from(kitProblems)
    .leftJoin(reportedPart, eq(reportedPart.id, kitProblems.partId))
    .leftJoin(replacementPart, eq(replacementPart.id, kitProblems.replacementPartId))
    .where(
      and(
        eq(kitProblems.courseId, courseId),
        "membershipId" in whose
          ? eq(kitProblems.membershipId, whose.membershipId)
          : and(eq(kitProblems.kitId, whose.kitId), ne(kitProblems.status, "resolved")),
      ),
    )
    .orderBy(desc(kitProblems.createdAt));
  return rows.map((row) => ({
    ...row.problem,
    partLabel: row.partLabel,
    replacementLabel: row.replacementLabel,
    updates: children.updates.read(row.updates),
    parcel: children.parcels.read(row.parcels)[0] ?? null,
  }));
}
export type KitProblemWithHistory = Awaited<ReturnType<typeof listKitProblems>>[number];

/** One problem with its kit, student, parts, history and parcel, for the problem page: one statement. */
export async function getKitProblem(executor: Executor, courseId: string, problemId: string) {
  const children = problemChildren();
  const [row] = await executor
    .select({
      problem: kitProblems,
      kitNumber: kits.number,
      kitState: kits.state,
      studentName: student.name,
      cohortId: courseMemberships.cohortId,
      cohortName: cohorts.name,
      partLabel: reportedPart.label,
      partKind: reportedPart.kind,
      replacementLabel: replacementPart.label,
      updates: children.updates.column,
      parcels: children.parcels.column,
    })
    .from(kitProblems)
    .innerJoin(kits, eq(kits.id, kitProblems.kitId))
    .leftJoin(courseMemberships, eq(courseMemberships.id, kitProblems.membershipId))
    .leftJoin(student, eq(student.id, courseMemberships.userId))
    .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
    .leftJoin(reportedPart, eq(reportedPart.id, kitProblems.partId))
    .leftJoin(replacementPart, eq(replacementPart.id, kitProblems.replacementPartId))
    .where(and(eq(kitProblems.id, problemId), eq(kitProblems.courseId, courseId)));
  if (!row) return null;
  const { problem, updates, parcels, ...rest } = row;
  return { ...problem, ...rest, updates: children.updates.read(updates), parcel: children.parcels.read(parcels)[0] ?? null };
}

export type KitProblemListQuery = { status?: KitProblemStatus; cohortIds?: string[]; page: number; pageSize: number };

/** Where a staff member's problem lists are narrowed to their cohorts' students (a TA's), or not at all. */
function inCohorts(cohortIds: string[] | undefined): SQL | undefined {
  if (!cohortIds) return undefined;
  return cohortIds.length ? inArray(courseMemberships.cohortId, cohortIds) : sql`false`;
}

/**
 * One page of the course's problems, open ones first (oldest first: they have waited longest), then
 * the resolved (latest first), and the total: two statements whatever the size.
 */
export async function listProblems(executor: Executor, courseId: string, query: KitProblemListQuery) {
  const where = and(
    eq(kitProblems.courseId, courseId),
    query.status ? eq(kitProblems.status, query.status) : undefined,
    inCohorts(query.cohortIds),
  );
  const isOpen = sql`${kitProblems.status} <> 'resolved'`;
  const [rows, [{ total }]] = await Promise.all([
    executor
      .select({
        id: kitProblems.id,
        status: kitProblems.status,
        kind: kitProblems.kind,
        note: kitProblems.note,
        createdAt: kitProblems.createdAt,
        updatedAt: kitProblems.updatedAt,
        kitId: kits.id,
        kitNumber: kits.number,
        studentName: student.name,
        cohortName: cohorts.name,
        partLabel: reportedPart.label,
      })
      .from(kitProblems)
      .innerJoin(kits, eq(kits.id, kitProblems.kitId))
      .leftJoin(courseMemberships, eq(courseMemberships.id, kitProblems.membershipId))
      .leftJoin(student, eq(student.id, courseMemberships.userId))
      .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
      .leftJoin(reportedPart, eq(reportedPart.id, kitProblems.partId))
      .where(where)
      .orderBy(
        desc(isOpen),
        sql`case when ${isOpen} then ${kitProblems.createdAt} end asc`,
        desc(kitProblems.updatedAt),
        asc(kitProblems.id),
      )
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    executor
      .select({ total: count() })
      .from(kitProblems)
      .leftJoin(courseMemberships, eq(courseMemberships.id, kitProblems.membershipId))
      .where(where),
  ]);
  return { rows, total };
}

/** For the course overview: how many problems are open, and the oldest few, in one statement. */
export async function openProblemsDigest(executor: Executor, courseId: string, cohortIds: string[] | undefined, oldest = 5) {
  const where = and(eq(kitProblems.courseId, courseId), inArray(kitProblems.status, [...openProblemStatuses]), inCohorts(cohortIds));
  const rows = await executor
    .select({
      id: kitProblems.id,
      status: kitProblems.status,
      kind: kitProblems.kind,
      createdAt: kitProblems.createdAt,
      kitNumber: kits.number,
      studentName: student.name,
      open: sql<number>`(count(*) over ())::int`,
    })
    .from(kitProblems)
    .innerJoin(kits, eq(kits.id, kitProblems.kitId))
    .leftJoin(courseMemberships, eq(courseMemberships.id, kitProblems.membershipId))
    .leftJoin(student, eq(student.id, courseMemberships.userId))
    .where(where)
    .orderBy(asc(kitProblems.createdAt), asc(kitProblems.id))
    .limit(oldest);
  return { open: rows[0]?.open ?? 0, oldest: rows.map(({ open: _open, ...problem }) => problem) };
}
