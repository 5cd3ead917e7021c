/**
 * Kits coming back at the end of term: the student sends theirs back with its return parcel, the staff
 * see which kits are overdue after the course's return-by date, the worker reminds their students, and
 * the kits are checked in together at the bench (`checkInKits`).
 */
import { and, asc, count, eq, getTableColumns, inArray, isNull, sql, type SQL } from "drizzle-orm";
import type { PgSelect } from "drizzle-orm/pg-core";
import { cohorts, courseMemberships, courses, invitations, kitParts, kits, parts, users } from "~/db/schema";
import { AppError } from "~/lib/app-error";
import { formatCalendarDay } from "~/lib/format-date";
import type { KitState } from "~/lib/kits/kit-states";
import type { PostalAddress } from "~/lib/shipping/postal-address";
import { appUrl } from "~/server/config.server";
import type { Database, Executor } from "~/server/db.server";
import { sendEmails } from "~/server/email/send-email.server";
import { jsonRows } from "~/server/json-rows.server";
import { moveKits, type Shipping } from "./kits.server";

/** The student sends their kit back: only a kit at their home, which moves to coming back with its return parcel. */
export async function sendKitBack(
  executor: Executor,
  { courseId, actorId, kitId, shipping }: { courseId: string; actorId: string; kitId: string; shipping: Shipping },
): Promise<void> {
  await executor.transaction(async (tx) => {
    const [kit] = await tx
      .select({ state: kits.state })
      .from(kits)
      .where(and(eq(kits.id, kitId), eq(kits.courseId, courseId)))
      .for("update");
    if (kit?.state !== "at_home")
      throw new AppError({ code: "kit_refused", message: "Only a kit at your home can be sent back; confirm its arrival first." });
    await moveKits(tx, { courseId, actorId, kitIds: [kitId], move: { to: "coming_back", shipping } });
  });
}

/** The course's return-by date, reminder days and return address: one statement. */
export async function returnSettingsOf(executor: Executor, courseId: string) {
  const [settings] = await executor
    .select({
      kitReturnBy: courses.kitReturnBy,
      kitReturnReminderDays: courses.kitReturnReminderDays,
      returnAddress: courses.returnAddress,
    })
    .from(courses)
    .where(eq(courses.id, courseId));
  return settings ?? { kitReturnBy: null, kitReturnReminderDays: [], returnAddress: null };
}

/** The course's return address as lines for a page or an e-mail; none when it is not set. */
export function addressLines(address: PostalAddress | null): string[] {
  if (!address) return [];
  const town = [address.postcode, address.city].filter(Boolean).join(" ");
  return [address.name, address.line1, address.line2, town, address.region, address.country].filter((line): line is string => !!line);
}

/** The course's day today, in its own zone: the return-by date's whole day counts. */
const localToday = (now: Date) => sql`(${now.toISOString()}::timestamptz at time zone ${courses.timeZone})::date`;

/** A kit's return-by date: its own when it was asked back early, else its course's. */
const returnByOf = sql`coalesce(${kits.returnBy}, ${courses.kitReturnBy})`;

/** Whole days since the return-by date, in the course's zone (1 on the day after it). */
const daysPastReturnBy = (now: Date) => sql<number>`(${localToday(now)} - ${returnByOf})`;

/**
 * The states the overdue list shows once the return-by date has passed. Only a kit `at_home` counts
 * as overdue (and is reminded): its student has it and has not sent it. A kit `coming_back` is in the
 * carrier's hands, and one still `in_transit` has not reached its student (or is being returned by the
 * post): both are shown with their parcels so that they can be followed, but nobody is chased for them.
 */
export const overdueListStates = ["at_home", "in_transit", "coming_back"] as const satisfies readonly KitState[];

export type OverdueQuery = { cohortIds?: string[]; page: number; pageSize: number; now?: Date };

/** The course's kits not back after its return-by date, with their student and last reminder: two statements whatever the size. */
export async function listOverdueKits(executor: Executor, courseId: string, query: OverdueQuery) {
  const now = query.now ?? new Date();
  const filters: SQL[] = [
    eq(kits.courseId, courseId),
    inArray(kits.state, [...overdueListStates]),
    sql`${returnByOf} is not null and ${localToday(now)} > ${returnByOf}`,
  ];
  if (query.cohortIds)
    filters.push(
      query.cohortIds.length ? inArray(sql`coalesce(${courseMemberships.cohortId}, ${invitations.cohortId})`, query.cohortIds) : sql`false`,
    );
  const where = and(...filters);
  const joined = <Query extends PgSelect>(query: Query) =>
    query
      .innerJoin(courses, eq(courses.id, kits.courseId))
      .leftJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
      .leftJoin(users, eq(users.id, courseMemberships.userId))
      .leftJoin(invitations, eq(invitations.id, kits.holderInvitationId))
      .leftJoin(cohorts, eq(cohorts.id, sql`coalesce(${courseMemberships.cohortId}, ${invitations.cohortId})`));
  const [rows, [{ total }]] = await Promise.all([
    joined(
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
          studentName: sql<string | null>`coalesce(${users.name}, ${invitations.name}, ${invitations.email})`,
          studentEmail: sql<string | null>`coalesce(${users.email}, ${invitations.email})`,
          invited: sql<boolean>`${kits.holderInvitationId} is not null`,
          cohortName: cohorts.name,
          daysOverdue: daysPastReturnBy(now),
          // Written out: the reminders are outbox rows named by their dedupe key (see sendOverdueReminders).
          lastReminderAt: sql<string | null>`(select to_json(max(o.created_at))#>>'{}' from email_outbox o
          where o.course_id = ${kits.courseId} and o.template = 'kit-overdue' and o.dedupe_key like 'kit-overdue:' || ${kits.id} || ':%')`,
        })
        .from(kits)
        .$dynamic(),
    )
      .where(where)
      .orderBy(sql`${kits.state} <> 'at_home'`, sql`length(${kits.number})`, asc(kits.number))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    joined(executor.select({ total: count() }).from(kits).$dynamic()).where(where),
  ]);
  return { rows: rows.map((row) => ({ ...row, overdue: row.state === "at_home" })), total };
}

/** Reminders go out from this hour of the course's day on: a student is not e-mailed at midnight. */
export const reminderHour = 9;

export type OverdueReminderOutcome = { sent: number };

/**
 * One run of the reminders, for every course: each student whose kit is still at home after the
 * return-by date is e-mailed on each of the course's reminder days, in the course's zone. A run on a day
 * between two reminder days sends the latest one due and not yet sent (so a worker that was down catches
 * up with one e-mail, not several). The dedupe key names the kit, the holder, the return-by date and the
 * day: once per (kit, holder, day), across runs and workers; a moved return-by date has its own
 * reminders. A constant number of statements whatever the number of kits.
 */
export async function sendOverdueReminders(database: Database, now = new Date()): Promise<OverdueReminderOutcome> {
  const reminderDay = sql<number>`(select max(d) from unnest(${courses.kitReturnReminderDays}) d where d <= ${daysPastReturnBy(now)})`;
  const dedupeKey = sql<string>`'kit-overdue:' || ${kits.id} || ':' || ${courseMemberships.id} || ':' || ${returnByOf} || ':' || ${reminderDay}`;
  return database.transaction(async (tx) => {
    const due = await tx
      .select({
        courseId: courses.id,
        courseTitle: courses.title,
        returnBy: sql<string>`${returnByOf}::text`,
        returnAddress: courses.returnAddress,
        kitNumber: kits.number,
        email: users.email,
        name: users.name,
        daysOverdue: daysPastReturnBy(now),
        dedupeKey,
      })
      .from(kits)
      .innerJoin(courses, eq(courses.id, kits.courseId))
      .innerJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
      .innerJoin(users, eq(users.id, courseMemberships.userId))
      .where(
        and(
          eq(kits.state, "at_home"),
          // An archived course is finished: nobody is chased for its kits any more.
          isNull(courses.archivedAt),
          sql`${courseMemberships.removedAt} is null`,
          sql`${returnByOf} is not null and ${localToday(now)} > ${returnByOf}`,
          sql`extract(hour from ${now.toISOString()}::timestamptz at time zone ${courses.timeZone}) >= ${reminderHour}`,
          sql`${reminderDay} is not null`,
          sql`not exists (select 1 from email_outbox o where o.dedupe_key = ${dedupeKey})`,
        ),
      );
    const queued = await sendEmails(
      tx,
      due.map((kit) => ({
        to: kit.email,
        toName: kit.name,
        template: "kit-overdue" as const,
        courseId: kit.courseId,
        dedupeKey: kit.dedupeKey,
        props: {
          courseTitle: kit.courseTitle,
          kitNumber: kit.kitNumber,
          returnBy: formatCalendarDay(kit.returnBy),
          daysOverdue: kit.daysOverdue,
          returnAddress: addressLines(kit.returnAddress),
          kitUrl: `${appUrl()}/courses/${kit.courseId}/my-kit`,
        },
      })),
    );
    return { sent: queued.filter((email) => !email.duplicate).length };
  });
}

/** The kits chosen for a check-in at the bench, with their parts and student: one statement. */
export async function kitsForCheckIn(executor: Executor, courseId: string, kitIds: string[]) {
  if (kitIds.length === 0) return [];
  const contents = jsonRows(
    { id: parts.id, label: parts.label, kind: parts.kind, exclusive: kitParts.exclusive },
    sql`from ${kitParts} join ${parts} on ${parts.id} = ${kitParts.partId} where ${kitParts.kitId} = ${kits.id}`,
    sql`${parts.label}`,
  );
  const rows = await executor
    .select({ ...getTableColumns(kits), studentName: users.name, parts: contents.column })
    .from(kits)
    .leftJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
    .leftJoin(users, eq(users.id, courseMemberships.userId))
    .where(and(eq(kits.courseId, courseId), inArray(kits.id, kitIds)))
    .orderBy(sql`length(${kits.number})`, asc(kits.number));
  return rows.map((row) => ({ ...row, parts: contents.read(row.parts) }));
}
