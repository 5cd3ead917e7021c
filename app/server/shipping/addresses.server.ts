/**
 * Students' shipping addresses: a member's, or an invited student's before they accept. Only the
 * student and the course's instructors see one (the routes check that), and every time an address is
 * shown to a person, an audit event names whose it was: `auditAddressViews` is that one INSERT.
 * `addressesFor` reads addresses without auditing, for work no person sees (buying labels).
 *
 * The instructor's CSV import is previewed against the course, then committed in one transaction
 * with a constant number of statements: the commit re-reads the course and refuses a preview that no
 * longer matches it, and an import key committed before writes nothing again.
 */
import { createHash } from "node:crypto";
import Papa from "papaparse";
import { and, desc, eq, inArray, isNull, or, sql } from "drizzle-orm";
import { auditEvents, courseMemberships, invitations, shippingAddresses, users } from "~/db/schema";
import { addressFields, postalAddressSchema } from "~/lib/shipping/address-schema";
import type { PostalAddress } from "~/lib/shipping/postal-address";
import { recordAudit } from "~/server/audit.server";
import type { Database, Executor } from "~/server/db.server";
import { clientIp } from "~/server/http.server";
import { openInvitation } from "~/server/members/open-invitation.server";

/** Whose address: a student member's, or a pending invitation's (until it is accepted). */
export type AddressOwner = { membershipId: string } | { invitationId: string };

/** How an audit event names whose address it was about. */
export const addressSubject = (owner: AddressOwner) =>
  "membershipId" in owner ? `membership:${owner.membershipId}` : `invitation:${owner.invitationId}`;

const ownerCondition = (courseId: string, owner: AddressOwner) =>
  and(
    eq(shippingAddresses.courseId, courseId),
    "membershipId" in owner
      ? eq(shippingAddresses.membershipId, owner.membershipId)
      : eq(shippingAddresses.invitationId, owner.invitationId),
  );

const addressColumns = {
  name: shippingAddresses.name,
  line1: shippingAddresses.line1,
  line2: shippingAddresses.line2,
  city: shippingAddresses.city,
  region: shippingAddresses.region,
  postcode: shippingAddresses.postcode,
  country: shippingAddresses.country,
  phone: shippingAddresses.phone,
};

export type StoredAddress = PostalAddress & { updatedAt: Date };

/** One owner's address, or null; the caller audits the view when it shows it. */
export async function getAddress(executor: Executor, courseId: string, owner: AddressOwner): Promise<StoredAddress | null> {
  const [row] = await executor
    .select({ ...addressColumns, updatedAt: shippingAddresses.updatedAt })
    .from(shippingAddresses)
    .where(ownerCondition(courseId, owner));
  return row ?? null;
}

/** One owner's address to show a person: read, and the view audited when there is one to see. */
export async function viewAddress(
  executor: Executor,
  { courseId, actorId, owner, request }: { courseId: string; actorId: string; owner: AddressOwner; request?: Request },
): Promise<StoredAddress | null> {
  const address = await getAddress(executor, courseId, owner);
  const ownerId = "membershipId" in owner ? owner.membershipId : owner.invitationId;
  if (address) await auditAddressViews(executor, { courseId, actorId, request, subjects: [ownerId] });
  return address;
}

/** The addresses of these members and invitations, by their id, in one statement and without audit: for work no person sees. */
export async function addressesFor(
  executor: Executor,
  courseId: string,
  { membershipIds = [], invitationIds = [] }: { membershipIds?: string[]; invitationIds?: string[] },
): Promise<Map<string, PostalAddress>> {
  if (membershipIds.length === 0 && invitationIds.length === 0) return new Map();
  const rows = await executor
    .select({ ...addressColumns, membershipId: shippingAddresses.membershipId, invitationId: shippingAddresses.invitationId })
    .from(shippingAddresses)
    .where(
      and(
        eq(shippingAddresses.courseId, courseId),
        or(
          membershipIds.length ? inArray(shippingAddresses.membershipId, membershipIds) : undefined,
          invitationIds.length ? inArray(shippingAddresses.invitationId, invitationIds) : undefined,
        ),
      ),
    );
  return new Map(rows.map(({ membershipId, invitationId, ...address }) => [(membershipId ?? invitationId)!, address]));
}

/**
 * Records that a person was shown these addresses: one `address.viewed` (or `address.exported`) event
 * per owner, in one INSERT. `subjects` are the owners' ids, membership or invitation, as `addressesFor`
 * keys them (an id already written as `membership:…` or `invitation:…` is read too); the event's
 * subject says which kind.
 */
export async function auditAddressViews(
  executor: Executor,
  {
    courseId,
    actorId,
    request,
    subjects,
    action = "address.viewed",
    detail = {},
  }: {
    courseId: string;
    actorId: string;
    request?: Request;
    subjects: string[];
    action?: "address.viewed" | "address.exported";
    detail?: Record<string, unknown>;
  },
): Promise<void> {
  if (subjects.length === 0) return;
  const ownerIds = subjects.map((subject) => subject.replace(/^(membership|invitation):/, ""));
  const ip = request ? clientIp(request) : null;
  await executor.execute(sql`
    insert into ${auditEvents} (course_id, actor_id, action, subject, ip, detail)
    select ${courseId}::uuid, ${actorId}::uuid, ${action}::text,
      case when exists (select 1 from ${courseMemberships} where ${courseMemberships.id} = owner_id) then 'membership:' else 'invitation:' end || owner_id,
      ${ip}::inet, ${JSON.stringify(detail)}::jsonb
    from unnest(${`{${ownerIds.join(",")}}`}::uuid[]) as owner_id`);
}

type AddressWrite = { owner: AddressOwner; address: PostalAddress };

/**
 * Writes addresses (new or replacing the owner's), in at most two statements whatever their number:
 * one per kind of owner, since each has its own unique index to meet on conflict.
 */
async function writeAddresses(executor: Executor, courseId: string, actorId: string, writes: AddressWrite[]): Promise<void> {
  const rowOf = ({ owner, address }: AddressWrite) => ({
    course_id: courseId,
    membership_id: "membershipId" in owner ? owner.membershipId : null,
    invitation_id: "invitationId" in owner ? owner.invitationId : null,
    ...Object.fromEntries(addressFields.map((field) => [field, address[field] ?? null])),
    updated_by_id: actorId,
  });
  for (const ownerColumn of ["membership_id", "invitation_id"] as const) {
    const rows = writes.map(rowOf).filter((row) => row[ownerColumn] !== null);
    if (rows.length === 0) continue;
    await executor.execute(sql`
      insert into ${shippingAddresses} (course_id, membership_id, invitation_id, name, line1, line2, city, region, postcode, country, phone, updated_by_id)
      select course_id, membership_id, invitation_id, name, line1, line2, city, region, postcode, country, phone, updated_by_id
      from json_populate_recordset(null::shipping_addresses, ${JSON.stringify(rows)}::json)
      on conflict (${sql.identifier(ownerColumn)}) do update set
        name = excluded.name, line1 = excluded.line1, line2 = excluded.line2, city = excluded.city, region = excluded.region,
        postcode = excluded.postcode, country = excluded.country, phone = excluded.phone,
        updated_by_id = excluded.updated_by_id, updated_at = now()`);
  }
}

/** Enters or replaces one owner's address (already checked by `postalAddressSchema`), with its `address.changed` event. */
export async function saveAddress(
  db: Database,
  {
    courseId,
    actorId,
    owner,
    address,
    request,
  }: { courseId: string; actorId: string; owner: AddressOwner; address: PostalAddress; request?: Request },
): Promise<void> {
  await db.transaction(async (tx) => {
    await writeAddresses(tx, courseId, actorId, [{ owner, address }]);
    await recordAudit(tx, { action: "address.changed", actorId, courseId, subject: addressSubject(owner), request });
  });
}

/** Deletes one owner's address; false when there was none (nothing is audited then). */
export async function deleteAddress(
  db: Database,
  { courseId, actorId, owner, request }: { courseId: string; actorId: string; owner: AddressOwner; request?: Request },
): Promise<boolean> {
  return db.transaction(async (tx) => {
    const deleted = await tx.delete(shippingAddresses).where(ownerCondition(courseId, owner)).returning({ id: shippingAddresses.id });
    if (deleted.length === 0) return false;
    await recordAudit(tx, { action: "address.deleted", actorId, courseId, subject: addressSubject(owner), request });
    return true;
  });
}

/** Accepting an invitation: its address becomes the new membership's (replacing one kept from an earlier membership). */
export async function moveInvitationAddress(
  executor: Executor,
  { invitationId, membershipId }: { invitationId: string; membershipId: string },
) {
  await executor
    .delete(shippingAddresses)
    .where(
      and(
        eq(shippingAddresses.membershipId, membershipId),
        sql`exists (select 1 from ${shippingAddresses} moving where moving.invitation_id = ${invitationId})`,
      ),
    );
  await executor
    .update(shippingAddresses)
    .set({ membershipId, invitationId: null, updatedAt: sql`now()` })
    .where(eq(shippingAddresses.invitationId, invitationId));
}

// ——— The instructor's CSV import ———

/** At most this many rows in one import: a term's cohort is a few hundred. */
export const maxAddressImportRows = 10_000;

/**
 * A CSV file's rows as text cells by lower-cased header, or what is wrong with the file as a whole.
 * Refused: no `email` column, a missing required column, more rows than `maxAddressImportRows`.
 */
export function readAddressCsv(text: string): { records: Record<string, string>[]; problem: string | null } {
  const parsed = Papa.parse<Record<string, string>>(text.replace(/^\uFEFF/, ""), {
    header: true,
    skipEmptyLines: "greedy",
    transformHeader: (header) => header.trim().toLowerCase(),
  });
  const headers = parsed.meta.fields ?? [];
  const missing = ["email", "line1", "city", "country"].filter((column) => !headers.includes(column));
  if (missing.length) return { records: [], problem: `The file has no ${missing.join(", ")} column; start from the template.` };
  if (parsed.data.length > maxAddressImportRows)
    return { records: [], problem: `Import at most ${maxAddressImportRows.toLocaleString("en")} addresses at a time.` };
  return { records: parsed.data, problem: null };
}

export type AddressImportStatus = "new" | "changed" | "unchanged" | "error";

export type AddressImportRow = {
  line: number;
  email: string;
  status: AddressImportStatus;
  /** Each as "field: message", or about the row as a whole (an e-mail nobody in the course has). */
  problems: string[];
  /** The student's name in the course, when the e-mail matched. */
  studentName: string | null;
  /** The fields that differ from the address kept, for a changed row. */
  changedFields: string[];
  address: PostalAddress | null;
};

export type AddressImportPreview = {
  rows: AddressImportRow[];
  /** Names the course's state the preview was made against: a commit against another state is refused. */
  fingerprint: string;
};

type Match = { owner: AddressOwner; name: string; current: PostalAddress | null };

/** The students (members, then pending invitations) these e-mails belong to, with the address each has now: two statements. */
async function matchStudents(executor: Executor, courseId: string, emails: string[]): Promise<Map<string, Match>> {
  if (emails.length === 0) return new Map();
  // One after the other: inside the import's transaction both go through the one client.
  const members = await executor
    .select({ id: courseMemberships.id, email: users.email, name: users.name, current: addressColumns })
    .from(courseMemberships)
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(shippingAddresses, eq(shippingAddresses.membershipId, courseMemberships.id))
    .where(
      and(
        eq(courseMemberships.courseId, courseId),
        eq(courseMemberships.role, "student"),
        isNull(courseMemberships.removedAt),
        inArray(users.email, emails),
      ),
    );
  const invited = await executor
    .select({ id: invitations.id, email: invitations.email, name: invitations.name, current: addressColumns })
    .from(invitations)
    .leftJoin(shippingAddresses, eq(shippingAddresses.invitationId, invitations.id))
    .where(and(eq(invitations.courseId, courseId), eq(invitations.role, "student"), openInvitation, inArray(invitations.email, emails)))
    // Newest first: of two pending invitations to one address, the later one is the one to be accepted.
    .orderBy(desc(invitations.createdAt), invitations.id);
  const matches = new Map<string, Match>();
  // A member wins over an invitation to the same address (`current` has a null name when there is no address).
  for (const member of members)
    matches.set(member.email, {
      owner: { membershipId: member.id },
      name: member.name,
      current: member.current?.name ? member.current : null,
    });
  for (const invitation of invited)
    if (!matches.has(invitation.email))
      matches.set(invitation.email, {
        owner: { invitationId: invitation.id },
        name: invitation.name ?? invitation.email,
        current: invitation.current?.name ? invitation.current : null,
      });
  return matches;
}

function previewRows(records: Record<string, string>[], matches: Map<string, Match>): AddressImportRow[] {
  const firstLine = new Map<string, number>();
  return records.map((record, index) => {
    const line = index + 2;
    const email = (record.email ?? "").trim().toLowerCase();
    const row = { line, email, problems: [] as string[], studentName: null, changedFields: [], address: null };
    if (!email) return { ...row, status: "error" as const, problems: ["The e-mail address is missing."] };
    if (firstLine.has(email))
      return { ...row, status: "error" as const, problems: [`The same e-mail is on line ${firstLine.get(email)}.`] };
    firstLine.set(email, line);
    const match = matches.get(email);
    if (!match)
      return { ...row, status: "error" as const, problems: ["No student of this course, or pending invitation, has this e-mail."] };
    // A blank name is the student's own, as the course knows it.
    const parsed = postalAddressSchema.safeParse({ ...record, name: record.name?.trim() || match.name });
    if (!parsed.success) {
      const problems = parsed.error.issues.map((issue) => `${issue.path.join(".") || "address"}: ${issue.message}`);
      return { ...row, studentName: match.name, status: "error" as const, problems };
    }
    const address = parsed.data;
    const changedFields = match.current
      ? addressFields.filter((field) => (address[field] ?? null) !== (match.current![field] ?? null))
      : [];
    const status = !match.current ? "new" : changedFields.length ? "changed" : "unchanged";
    return { ...row, studentName: match.name, status, changedFields, address };
  });
}

function fingerprintOf(rows: AddressImportRow[], matches: Map<string, Match>): string {
  const state = rows.map((row) => [row.line, row.status, row.address, matches.get(row.email) ?? null]);
  return createHash("sha256").update(JSON.stringify(state)).digest("hex");
}

async function preview(executor: Executor, courseId: string, records: Record<string, string>[]) {
  const emails = [...new Set(records.map((record) => (record.email ?? "").trim().toLowerCase()).filter(Boolean))];
  const matches = await matchStudents(executor, courseId, emails);
  const rows = previewRows(records, matches);
  return { rows, matches, fingerprint: fingerprintOf(rows, matches) };
}

/** Each row of the file against the course as it is now: new, changed, unchanged, or an error with its message. */
export async function previewAddressImport(
  executor: Executor,
  courseId: string,
  records: Record<string, string>[],
): Promise<AddressImportPreview> {
  const { rows, fingerprint } = await preview(executor, courseId, records);
  return { rows, fingerprint };
}

export type AddressImportResult =
  | { ok: true; duplicate: false; written: number; unchanged: number; skipped: number }
  /** This import key was committed before: nothing was written again. */
  | { ok: true; duplicate: true; committedAt: Date }
  /** The course changed since the preview (an address entered, an invitation accepted): nothing was written. */
  | { ok: false; preview: AddressImportPreview };

/**
 * Writes the new and changed rows of a preview, all in one transaction, or none when the course no
 * longer matches the preview. Rows in error are not written (the preview showed them as such).
 */
export async function importAddresses(
  db: Database,
  {
    courseId,
    actorId,
    importKey,
    fingerprint,
    records,
    request,
  }: { courseId: string; actorId: string; importKey: string; fingerprint: string; records: Record<string, string>[]; request?: Request },
): Promise<AddressImportResult> {
  return db.transaction(async (tx) => {
    // One import of a course at a time: a second commit of the same key waits here for the first
    // one's transaction, then finds its events below.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`address-import:${courseId}`}, 0))`);
    const [earlier] = await tx
      .select({ createdAt: auditEvents.createdAt })
      .from(auditEvents)
      .where(
        and(
          eq(auditEvents.courseId, courseId),
          eq(auditEvents.action, "address.imported"),
          sql`${auditEvents.detail}->>'importKey' = ${importKey}`,
        ),
      )
      .limit(1);
    if (earlier) return { ok: true as const, duplicate: true as const, committedAt: earlier.createdAt };

    const now = await preview(tx, courseId, records);
    if (now.fingerprint !== fingerprint) return { ok: false as const, preview: { rows: now.rows, fingerprint: now.fingerprint } };

    const writes = now.rows
      .filter((row) => row.status === "new" || row.status === "changed")
      .map((row) => ({ owner: now.matches.get(row.email)!.owner, address: row.address! }));
    await writeAddresses(tx, courseId, actorId, writes);
    await recordAudit(
      tx,
      writes.map(({ owner }) => ({
        action: "address.imported" as const,
        actorId,
        courseId,
        subject: addressSubject(owner),
        detail: { importKey },
        request,
      })),
    );
    const count = (status: AddressImportStatus) => now.rows.filter((row) => row.status === status).length;
    return { ok: true as const, duplicate: false as const, written: writes.length, unchanged: count("unchanged"), skipped: count("error") };
  });
}
