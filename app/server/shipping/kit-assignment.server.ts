/**
 * Kits for a whole cohort at once. The plan is made in memory from a handful of reads: each chosen
 * student (or invited student who has not accepted yet) gets a kit on the shelf whose parts suit the
 * lab, else a new kit made of loose parts. Committing it is one transaction with a constant number of
 * statements, which re-reads and locks what the plan took and refuses the whole plan when any of it
 * changed meanwhile.
 */
import { randomUUID } from "node:crypto";
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import { cohorts, kitEvents, kitParts, kits, labs, parts } from "~/db/schema";
import { AppError } from "~/lib/app-error";
import { isEntityId } from "~/lib/forms/ids";
import { nextKitNumbers } from "~/lib/kits/next-kit-numbers";
import type { KitState } from "~/lib/kits/kit-states";
import type { CandidateKitState } from "~/lib/shipping/shipping-states";
import { insertMany } from "~/server/bulk-insert.server";
import type { Executor } from "~/server/db.server";
import { moveKits, type KitHolder } from "~/server/kits/kits.server";

/** A student as the shipping pages list them: `m:` a member, `i:` an invited student, then the id. */
export type CandidateKey = `m:${string}` | `i:${string}`;

export const holderOfKey = (key: CandidateKey): KitHolder =>
  key.startsWith("m:") ? { membershipId: key.slice(2) } : { invitationId: key.slice(2) };

export type CandidateFilter = {
  cohortId?: string;
  kitState?: CandidateKitState;
  /** Chosen by hand: only these. */
  keys?: CandidateKey[];
};

export type Candidate = {
  key: CandidateKey;
  name: string;
  email: string;
  invited: boolean;
  cohortName: string | null;
  kitId: string | null;
  kitNumber: string | null;
  kitState: KitState | null;
};

type CandidateRow = {
  kind: "m" | "i";
  id: string;
  name: string;
  email: string;
  cohort_name: string | null;
  kit_id: string | null;
  kit_number: string | null;
  kit_state: KitState | null;
  total: number;
};

/**
 * The course's students and pending student invitations with the kit each holds (a kit coming back
 * does not count, as in the one-kit-per-student index), filtered and paged: one statement.
 */
export async function listCandidates(
  executor: Executor,
  courseId: string,
  filter: CandidateFilter,
  paging?: { page: number; pageSize: number },
): Promise<{ rows: Candidate[]; total: number }> {
  // As array literals (one parameter each); only well-formed ids get in.
  const idsOf = (kind: "m" | "i") =>
    filter.keys &&
    `{${filter.keys
      .filter((key) => key.startsWith(`${kind}:`))
      .map((key) => key.slice(2))
      .filter(isEntityId)
      .join(",")}}`;
  const members = idsOf("m");
  const invited = idsOf("i");
  // Raw: one list over two tables (members and invitations), filtered and paged as one.
  const result = await executor.execute<CandidateRow>(sql`
    with candidates as (
      select 'm' as kind, m.id, u.name, u.email, m.cohort_id, k.id as kit_id, k.number as kit_number, k.state as kit_state
      from course_memberships m
      join users u on u.id = m.user_id
      left join kits k on k.holder_membership_id = m.id and k.state <> 'coming_back'
      where m.course_id = ${courseId} and m.role = 'student' and m.removed_at is null
        ${members ? sql`and m.id = any(${members}::uuid[])` : sql``}
      union all
      select 'i', i.id, coalesce(i.name, i.email), i.email, i.cohort_id, k.id, k.number, k.state
      from invitations i
      left join kits k on k.holder_invitation_id = i.id and k.state <> 'coming_back'
      where i.course_id = ${courseId} and i.role = 'student' and i.accepted_at is null and i.expires_at > now()
        and i.revoked_at is null and i.replaced_by_id is null
        ${invited ? sql`and i.id = any(${invited}::uuid[])` : sql``}
    )
    select c.kind, c.id, c.name, c.email, co.name as cohort_name, c.kit_id, c.kit_number, c.kit_state, count(*) over ()::int as total
    from candidates c
    left join cohorts co on co.id = c.cohort_id
    where true
      ${filter.cohortId ? sql`and c.cohort_id = ${filter.cohortId}` : sql``}
      ${filter.kitState === "none" ? sql`and c.kit_id is null` : filter.kitState ? sql`and c.kit_state = ${filter.kitState}` : sql``}
    order by co.name nulls last, c.name, c.id
    ${paging ? sql`limit ${paging.pageSize} offset ${(paging.page - 1) * paging.pageSize}` : sql``}`);
  return {
    rows: result.rows.map((row) => ({
      key: `${row.kind}:${row.id}` as CandidateKey,
      name: row.name,
      email: row.email,
      invited: row.kind === "i",
      cohortName: row.cohort_name,
      kitId: row.kit_id,
      kitNumber: row.kit_number,
      kitState: row.kit_state,
    })),
    total: result.rows[0]?.total ?? 0,
  };
}

type PartRow = {
  id: string;
  label: string;
  kind: "sphere" | "fluid_lot" | "column" | "accessory";
  status: "in_service" | "remeasure" | "retired";
  diameterMm: number | null;
  innerDiameterMm: number | null;
  bottlesOnHand: number | null;
};

const partColumns = {
  id: parts.id,
  label: parts.label,
  kind: parts.kind,
  status: parts.status,
  diameterMm: parts.diameterMm,
  innerDiameterMm: parts.innerDiameterMm,
  bottlesOnHand: parts.bottlesOnHand,
};

/** Which parts a lab lets students use: a kind with no part named in the lab allows any part of that kind. */
type LabParts = { allows: (part: PartRow) => boolean };

function labParts(allowedIds: string[], allowedKinds: string[]): LabParts {
  const ids = new Set(allowedIds);
  const kinds = new Set(allowedKinds);
  return { allows: (part) => !kinds.has(part.kind) || ids.has(part.id) };
}

/** A sphere falls freely only in a column whose bore is wider than the sphere. */
const fits = (sphere: PartRow, column: PartRow) => sphere.diameterMm! < column.innerDiameterMm!;

/** The parts of a kit that make it usable for the lab: an allowed sphere, fluid lot and a column wider than the sphere. */
function suitingParts(lab: LabParts, contents: PartRow[]): PartRow[] | null {
  if (contents.some((part) => part.status !== "in_service")) return null;
  const usable = contents.filter((part) => lab.allows(part));
  const lot = usable.find((part) => part.kind === "fluid_lot");
  for (const sphere of usable.filter((part) => part.kind === "sphere")) {
    const column = usable.find((part) => part.kind === "column" && fits(sphere, part));
    if (lot && column) return [sphere, lot, column];
  }
  return null;
}

export type PlannedKit = {
  key: CandidateKey;
  studentName: string;
  /** An existing kit from the shelf, or null: a new kit made up of `partIds`. */
  kitId: string | null;
  number: string;
  /** Sphere, fluid lot, column. */
  partIds: string[];
  partLabels: string[];
};
export type KitPlan = { labId: string; kits: PlannedKit[]; refused: { key: CandidateKey; studentName: string; reason: string }[] };

async function readLab(executor: Executor, courseId: string, labId: string): Promise<LabParts> {
  const [lab] = await executor
    .select({
      allowedPartIds: labs.allowedPartIds,
      allowedKinds: sql<string[]>`array(select distinct p.kind from parts p where p.id = any(${labs.allowedPartIds}))::text[]`,
    })
    .from(labs)
    .where(and(eq(labs.id, labId), eq(labs.courseId, courseId)));
  if (!lab) throw new AppError({ code: "lab_not_found", message: "There is no such lab in this course.", field: "labId", status: 404 });
  return labParts(lab.allowedPartIds, lab.allowedKinds);
}

/**
 * Plans a kit for each chosen student who holds none: kits on the shelf first (by number), then new
 * kits from loose parts, each sphere with the narrowest free column it fits. Five reads, whatever the size.
 */
export async function planKitAssignment(
  executor: Executor,
  { courseId, labId, filter }: { courseId: string; labId: string; filter: CandidateFilter },
): Promise<KitPlan> {
  const [lab, { rows: candidates }, shelfRows, looseParts, numbers] = await Promise.all([
    readLab(executor, courseId, labId),
    listCandidates(executor, courseId, filter),
    executor
      .select({ kitId: kits.id, number: kits.number, part: partColumns })
      .from(kits)
      .innerJoin(kitParts, eq(kitParts.kitId, kits.id))
      .innerJoin(parts, eq(parts.id, kitParts.partId))
      .where(and(eq(kits.courseId, courseId), eq(kits.state, "on_shelf"), isNull(kits.holderMembershipId), isNull(kits.holderInvitationId)))
      .orderBy(sql`length(${kits.number})`, kits.number),
    executor
      .select(partColumns)
      .from(parts)
      .leftJoin(kitParts, and(eq(kitParts.partId, parts.id), eq(kitParts.exclusive, true)))
      .where(and(eq(parts.courseId, courseId), eq(parts.status, "in_service"), isNull(kitParts.kitId)))
      .orderBy(parts.label),
    executor.select({ number: kits.number }).from(kits).where(eq(kits.courseId, courseId)),
  ]);

  const refused: KitPlan["refused"] = [];
  const waiting = candidates.filter((candidate) => {
    if (!candidate.kitNumber) return true;
    refused.push({ key: candidate.key, studentName: candidate.name, reason: `Already holds kit ${candidate.kitNumber}.` });
    return false;
  });

  const shelf = new Map<string, { number: string; contents: PartRow[] }>();
  for (const row of shelfRows) {
    const kit = shelf.get(row.kitId) ?? { number: row.number, contents: [] };
    kit.contents.push(row.part);
    shelf.set(row.kitId, kit);
  }
  const planned: PlannedKit[] = [];
  const shelfKits = [...shelf.entries()].flatMap(([kitId, kit]) => {
    const chosen = suitingParts(lab, kit.contents);
    return chosen ? [{ kitId, number: kit.number, chosen }] : [];
  });
  for (const [index, kit] of shelfKits.slice(0, waiting.length).entries()) {
    const candidate = waiting[index];
    planned.push({
      key: candidate.key,
      studentName: candidate.name,
      kitId: kit.kitId,
      number: kit.number,
      partIds: kit.chosen.map((part) => part.id),
      partLabels: kit.chosen.map((part) => part.label),
    });
  }

  const usable = looseParts.filter((part) => lab.allows(part));
  const spheres = usable.filter((part) => part.kind === "sphere");
  // Narrowest bore first: each sphere takes the narrowest column it fits, leaving wide ones for wide spheres.
  const columns = usable.filter((part) => part.kind === "column").sort((a, b) => a.innerDiameterMm! - b.innerDiameterMm!);
  const lots = usable.filter((part) => part.kind === "fluid_lot").map((lot) => ({ lot, left: lot.bottlesOnHand }));
  const newNumbers = nextKitNumbers(
    numbers.map((row) => row.number),
    Math.max(0, waiting.length - planned.length),
  );
  for (const candidate of waiting.slice(planned.length)) {
    const lot = lots.find((entry) => entry.left === null || entry.left > 0);
    const pair = spheres.flatMap((sphere) => {
      const column = columns.find((candidateColumn) => fits(sphere, candidateColumn));
      return column ? [{ sphere, column }] : [];
    })[0];
    const reason = !lot
      ? "No fluid lot of this lab has bottles left."
      : spheres.length === 0
        ? "No sphere of this lab is left on the shelf."
        : !pair
          ? "No free column has a bore wider than the spheres left."
          : null;
    if (reason) {
      refused.push({ key: candidate.key, studentName: candidate.name, reason });
      continue;
    }
    if (lot!.left !== null) lot!.left--;
    spheres.splice(spheres.indexOf(pair!.sphere), 1);
    columns.splice(columns.indexOf(pair!.column), 1);
    const chosen = [pair!.sphere, lot!.lot, pair!.column];
    planned.push({
      key: candidate.key,
      studentName: candidate.name,
      kitId: null,
      number: newNumbers.shift()!,
      partIds: chosen.map((part) => part.id),
      partLabels: chosen.map((part) => part.label),
    });
  }
  return { labId, kits: planned, refused };
}

const stale = (what: string) =>
  new AppError({
    code: "plan_stale",
    message: `The plan is out of date: ${what} Nothing was packed; preview the plan again.`,
    status: 409,
  });

/**
 * Packs a previewed plan in one transaction: locks the kits and parts it names, checks each is still
 * where the plan found it (and still suits the lab), makes up the new kits, takes one bottle from each
 * counted lot per kit, and packs every kit for its student through `moveKits`. Any change meanwhile
 * refuses the whole plan.
 */
export async function commitKitAssignment(
  executor: Executor,
  {
    courseId,
    actorId,
    labId,
    kits: plan,
  }: { courseId: string; actorId: string; labId: string; kits: Pick<PlannedKit, "key" | "kitId" | "number" | "partIds">[] },
): Promise<{ packed: number; made: number; kitIds: string[] }> {
  if (plan.length === 0) throw new AppError({ code: "plan_empty", message: "The plan has no kit to pack." });
  return executor.transaction(async (tx) => {
    const shelfIds = plan.flatMap((kit) => (kit.kitId ? [kit.kitId] : []));
    const fresh = plan.filter((kit) => !kit.kitId);
    const partIds = [...new Set(plan.flatMap((kit) => kit.partIds))];
    // One after the other: a transaction's client runs one statement at a time.
    const lab = await readLab(tx, courseId, labId);
    const shelfKits = shelfIds.length
      ? await tx
          .select({
            id: kits.id,
            number: kits.number,
            state: kits.state,
            membership: kits.holderMembershipId,
            invitation: kits.holderInvitationId,
          })
          .from(kits)
          .where(and(eq(kits.courseId, courseId), inArray(kits.id, shelfIds)))
          .orderBy(kits.id)
          .for("update")
      : [];
    const contents = shelfIds.length
      ? await tx.select({ kitId: kitParts.kitId, partId: kitParts.partId }).from(kitParts).where(inArray(kitParts.kitId, shelfIds))
      : [];
    const partRows = await tx
      .select({
        ...partColumns,
        inKit: sql<string | null>`(select kp.kit_id from kit_parts kp where kp.part_id = ${parts.id} and kp.exclusive)`,
      })
      .from(parts)
      .where(and(eq(parts.courseId, courseId), inArray(parts.id, partIds)))
      .orderBy(parts.id)
      .for("update");
    const takenNumbers = fresh.length
      ? await tx
          .select({ number: kits.number })
          .from(kits)
          .where(
            and(
              eq(kits.courseId, courseId),
              inArray(
                kits.number,
                fresh.map((kit) => kit.number),
              ),
            ),
          )
      : [];
    const byId = new Map(partRows.map((part) => [part.id, part]));
    if (byId.size !== partIds.length) throw stale("some of its parts are no longer in this course's inventory.");
    const shelfById = new Map(shelfKits.map((kit) => [kit.id, kit]));
    const inKit = new Set(contents.map((row) => `${row.kitId} ${row.partId}`));
    for (const kit of plan) {
      const chosen = kit.partIds.map((id) => byId.get(id)!);
      if (chosen.length !== 3 || !suitingParts(lab, chosen)) throw stale(`the parts planned for kit ${kit.number} no longer suit the lab.`);
      if (kit.kitId) {
        const found = shelfById.get(kit.kitId);
        if (
          !found ||
          found.state !== "on_shelf" ||
          found.membership ||
          found.invitation ||
          !kit.partIds.every((id) => inKit.has(`${kit.kitId} ${id}`))
        )
          throw stale(`kit ${found?.number ?? kit.number} is no longer on the shelf as planned.`);
      } else {
        const busy = chosen.find((part) => part.kind !== "fluid_lot" && part.inKit);
        if (busy) throw stale(`${busy.label} was put in another kit meanwhile.`);
      }
    }
    if (takenNumbers.length) throw stale(`kit ${takenNumbers.map((row) => row.number).join(", ")} was made meanwhile.`);
    const bottlesTaken = new Map<string, number>();
    for (const kit of fresh) {
      const lot = kit.partIds.map((id) => byId.get(id)!).find((part) => part.kind === "fluid_lot")!;
      if (lot.bottlesOnHand !== null) bottlesTaken.set(lot.id, (bottlesTaken.get(lot.id) ?? 0) + 1);
    }
    const short = [...bottlesTaken].find(([id, taken]) => byId.get(id)!.bottlesOnHand! < taken);
    if (short) throw stale(`fluid lot ${byId.get(short[0])!.label} has ${byId.get(short[0])!.bottlesOnHand} bottles left.`);

    const made = fresh.map((kit) => ({ ...kit, kitId: randomUUID() }));
    if (made.length) {
      await insertMany(
        tx,
        kits,
        made.map((kit) => ({ id: kit.kitId, courseId, number: kit.number })),
      );
      await insertMany(
        tx,
        kitParts,
        made.flatMap((kit) =>
          kit.partIds.map((partId) => ({ kitId: kit.kitId, partId, exclusive: byId.get(partId)!.kind !== "fluid_lot" })),
        ),
      );
      await insertMany(
        tx,
        kitEvents,
        made.map((kit) => ({
          kitId: kit.kitId,
          actorId,
          toState: "on_shelf" as const,
          action: "created",
          note: null,
          detail: { partIds: kit.partIds },
        })),
      );
    }
    if (bottlesTaken.size) {
      const lotIds = [...bottlesTaken.keys()];
      await tx
        .update(parts)
        .set({
          bottlesOnHand: sql`${parts.bottlesOnHand} - (case ${parts.id} ${sql.join(
            lotIds.map((id) => sql`when ${id}::uuid then ${bottlesTaken.get(id)!}::int`),
            sql` `,
          )} end)`,
          updatedAt: new Date(),
        })
        .where(inArray(parts.id, lotIds));
    }
    const all = [...plan.filter((kit) => kit.kitId), ...made] as { kitId: string; key: CandidateKey }[];
    await moveKits(tx, {
      courseId,
      actorId,
      kitIds: all.map((kit) => kit.kitId),
      move: { to: "packed", holders: Object.fromEntries(all.map((kit) => [kit.kitId, holderOfKey(kit.key)])) },
    });
    return { packed: all.length, made: made.length, kitIds: all.map((kit) => kit.kitId) };
  });
}

/** What the "Ship a cohort" page offers to choose from: the course's labs and cohorts (two statements). */
export async function shippingChoices(executor: Executor, courseId: string) {
  const [labRows, cohortRows] = await Promise.all([
    executor.select({ id: labs.id, title: labs.title }).from(labs).where(eq(labs.courseId, courseId)).orderBy(labs.title),
    executor
      .select({ id: cohorts.id, name: cohorts.name })
      .from(cohorts)
      .where(eq(cohorts.courseId, courseId))
      .orderBy(cohorts.position, cohorts.name),
  ]);
  return { labs: labRows, cohorts: cohortRows };
}
