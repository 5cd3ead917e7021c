/**
 * The course's measured parts: recording them, re-measuring them (history keeps old and new values),
 * and the checks that catch a mis-typed measurement before a student's reduction depends on it.
 */
import { AppError } from "~/lib/app-error";
import { and, asc, count, eq, getTableColumns, ilike, inArray, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { courseMemberships, kitParts, kits, partEvents, parts, users } from "~/db/schema";
import { materialDensityRanges, sphereDensityKgM3, type PartInput, type PartKind } from "~/lib/kits/part-input";
import { fluidLotCalibration } from "~/lib/kits/fluid-lot-fit";
import { calibrationCheckMessages, checkCalibrationPoints } from "~/lib/kits/glycerol-water";
import { checkImportRows, csvRowToPartInput, partToCsvRow, type ImportRowCheck, type PartCsvRow } from "~/lib/kits/parts-csv";
import { recordAudit } from "~/server/audit.server";
import { canOpenKit, type CourseAccess } from "~/server/auth/access.server";
import { isUniqueViolation, type Executor } from "~/server/db.server";
import { jsonRows, orNull } from "~/server/json-rows.server";
import { queueRereduction, reductionChanges } from "~/server/kits/rereduce.server";

export type Part = typeof parts.$inferSelect;
export type PartWarning = { field: string; message: string };

const measurementColumns = [
  "material",
  "diameterMm",
  "diameterResolutionMm",
  "massG",
  "massResolutionG",
  "fluidName",
  "densityKgM3",
  "densityUncertaintyKgM3",
  "densityTemperatureCoefficientKgM3K",
  "glycerolMassFraction",
  "calibration",
  "innerDiameterMm",
  "innerDiameterUncertaintyMm",
  "timedDistanceMm",
  "runInMm",
  "marginBelowMm",
  "accessoryType",
] as const;

/**
 * The columns of one kind filled from the input, every other kind's column null. An optional value
 * left empty is null too: an update skips undefined columns, so a cleared value would otherwise stay.
 */
function columnsFor(input: PartInput) {
  const empty = Object.fromEntries(measurementColumns.map((column) => [column, null])) as Record<(typeof measurementColumns)[number], null>;
  const { kind: _kind, label: _label, notes: _notes, ...measured } = input;
  const filled = Object.fromEntries(Object.entries(measured).filter(([, value]) => value !== undefined));
  return { ...empty, ...(filled as typeof measured) };
}

/**
 * Checks a part against its material and the rest of the inventory. They are warnings: the instructor
 * may be about to add the fluid or column that makes the part usable.
 */
export function partWarnings(
  input: PartInput,
  inventory: Pick<Part, "kind" | "label" | "densityKgM3" | "innerDiameterMm">[],
): PartWarning[] {
  const warnings: PartWarning[] = [];
  if (input.kind === "sphere") {
    const density = sphereDensityKgM3(input.massG, input.diameterMm);
    const range = materialDensityRanges[input.material.toLowerCase()];
    if (range && (density < range[0] || density > range[1])) {
      warnings.push({
        field: "massG",
        message: `Diameter and mass give ${Math.round(density)} kg/m³, outside the usual ${range[0]}–${range[1]} kg/m³ for ${input.material}: check both measurements.`,
      });
    }
    const fluids = inventory.filter((part) => part.kind === "fluid_lot" && part.densityKgM3 !== null);
    if (fluids.length > 0 && fluids.every((fluid) => fluid.densityKgM3! >= density)) {
      warnings.push({
        field: "massG",
        message: `At ${Math.round(density)} kg/m³ this sphere is lighter than every fluid lot: it would float instead of settling.`,
      });
    }
    const columns = inventory.filter((part) => part.kind === "column" && part.innerDiameterMm !== null);
    if (columns.length > 0 && columns.every((column) => column.innerDiameterMm! <= input.diameterMm)) {
      warnings.push({
        field: "diameterMm",
        message: "This sphere is wider than the bore of every column: it cannot be dropped in any of them.",
      });
    }
  }
  if (input.kind === "fluid_lot") {
    if (input.calibration.length === 1) {
      warnings.push({
        field: "calibration",
        message:
          "One calibration point gives a constant viscosity; viscous fluids change by several per cent per kelvin, so add points at other temperatures.",
      });
    }
    const glycerolMassFraction = input.glycerolMassFraction ?? null;
    for (const message of calibrationCheckMessages(checkCalibrationPoints(input.calibration, glycerolMassFraction), glycerolMassFraction)) {
      warnings.push({ field: "calibration", message });
    }
  }
  if (input.kind === "column" && input.runInMm < 3 * input.innerDiameterMm) {
    warnings.push({
      field: "runInMm",
      message: "The run-in above the top band is short for the bore; check the sphere reaches terminal velocity before the band.",
    });
  }
  return warnings;
}

async function inventoryForChecks(executor: Executor, courseId: string) {
  return executor
    .select({ kind: parts.kind, label: parts.label, densityKgM3: parts.densityKgM3, innerDiameterMm: parts.innerDiameterMm })
    .from(parts)
    .where(and(eq(parts.courseId, courseId), inArray(parts.kind, ["fluid_lot", "column"]), sql`${parts.status} <> 'retired'`));
}

const duplicateLabel = (label: string, afterwards = "") =>
  new AppError({
    code: "duplicate_label",
    message: `The label ${label} is already used by another part in this course.${afterwards}`,
    field: "label",
  });

export async function createPart(
  executor: Executor,
  { courseId, actorId, input }: { courseId: string; actorId: string; input: PartInput },
): Promise<{ part: Part; warnings: PartWarning[] }> {
  const warnings = partWarnings(input, await inventoryForChecks(executor, courseId));
  try {
    return await executor.transaction(async (tx) => {
      const [part] = await tx
        .insert(parts)
        .values({ courseId, kind: input.kind, label: input.label, notes: input.notes, ...columnsFor(input) })
        .returning();
      await tx.insert(partEvents).values({ partId: part.id, actorId, action: "created", detail: { warnings } });
      await recordAudit(tx, { action: "part.created", actorId, courseId, subject: `part:${part.id}` });
      return { part, warnings };
    });
  } catch (error) {
    if (isUniqueViolation(error)) throw duplicateLabel(input.label);
    throw error;
  }
}

/**
 * A re-measurement: the new values replace the old, and the history keeps both. A change of a value
 * that enters reductions also queues, on the same transaction, the re-reduction of every version that
 * used the part (see rereduce.server.ts).
 */
export async function updatePart(
  executor: Executor,
  { courseId, partId, actorId, input, note }: { courseId: string; partId: string; actorId: string; input: PartInput; note?: string | null },
): Promise<{ part: Part; warnings: PartWarning[] } | null> {
  const warnings = partWarnings(input, await inventoryForChecks(executor, courseId));
  try {
    return await executor.transaction(async (tx) => {
      const [before] = await tx
        .select()
        .from(parts)
        .where(and(eq(parts.id, partId), eq(parts.courseId, courseId)))
        .for("update");
      if (!before || before.kind !== input.kind) return null;
      const after = { label: input.label, notes: input.notes, ...columnsFor(input) };
      const changed = Object.fromEntries(
        Object.entries(after)
          .filter(([key, value]) => JSON.stringify(before[key as keyof Part]) !== JSON.stringify(value))
          .map(([key, value]) => [key, { from: before[key as keyof Part], to: value }]),
      );
      // A part waiting for re-measurement returns to service once its new values are in.
      const status = before.status === "remeasure" ? "in_service" : before.status;
      const reduction = reductionChanges(changed);
      const revises = Object.keys(reduction).length > 0;
      const now = new Date();
      const [part] = await tx
        .update(parts)
        .set({ ...after, status, updatedAt: now, ...(revises ? { reductionChangedAt: now } : {}) })
        .where(eq(parts.id, partId))
        .returning();
      const [event] = await tx
        .insert(partEvents)
        .values({ partId, actorId, action: "remeasured", note: note ?? null, detail: { changed, warnings } })
        .returning({ id: partEvents.id });
      await recordAudit(tx, { action: "part.changed", actorId, courseId, subject: `part:${partId}`, detail: { change: "remeasured" } });
      if (revises) {
        const runId = await queueRereduction(tx, { courseId, partId, partEventId: event.id });
        await recordAudit(tx, {
          action: "part.rereduction_queued",
          actorId,
          courseId,
          subject: `part:${partId}`,
          detail: { partLabel: part.label, partEventId: event.id, runId, changes: reduction },
        });
      }
      return { part, warnings };
    });
  } catch (error) {
    if (isUniqueViolation(error)) throw duplicateLabel(input.label);
    throw error;
  }
}

export async function setPartStatus(
  executor: Executor,
  {
    courseId,
    partId,
    actorId,
    status,
    note,
  }: { courseId: string; partId: string; actorId: string; status: Part["status"]; note?: string | null },
): Promise<boolean> {
  return executor.transaction(async (tx) => {
    const updated = await tx
      .update(parts)
      .set({ status, updatedAt: new Date() })
      .where(and(eq(parts.id, partId), eq(parts.courseId, courseId)))
      .returning({ id: parts.id });
    if (updated.length === 0) return false;
    await tx.insert(partEvents).values({ partId, actorId, action: `status:${status}`, note: note ?? null });
    await recordAudit(tx, { action: "part.changed", actorId, courseId, subject: `part:${partId}`, detail: { change: `status:${status}` } });
    return true;
  });
}

export type PartListQuery = { kind?: PartKind; status?: Part["status"]; search?: string; page: number; pageSize: number };

/** One page of the parts table plus its total, in two statements whatever the inventory's size. */
export async function listParts(executor: Executor, courseId: string, query: PartListQuery) {
  const filters: SQL[] = [eq(parts.courseId, courseId)];
  if (query.kind) filters.push(eq(parts.kind, query.kind));
  if (query.status) filters.push(eq(parts.status, query.status));
  if (query.search) filters.push(ilike(parts.label, `%${query.search.replace(/[%_\\]/g, "\\$&")}%`));
  const where = and(...filters);
  const [rows, [{ total }]] = await Promise.all([
    executor
      .select({ part: parts, kitNumber: kits.number })
      .from(parts)
      // Fluid lots sit in many kits; only the exclusive parts name their one kit.
      .leftJoin(kitParts, and(eq(kitParts.partId, parts.id), eq(kitParts.exclusive, true)))
      .leftJoin(kits, eq(kits.id, kitParts.kitId))
      .where(where)
      .orderBy(asc(parts.kind), asc(parts.label))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    executor.select({ total: count() }).from(parts).where(where),
  ]);
  return { rows: rows.map(({ part, kitNumber }) => ({ ...part, kitNumber })), total };
}

export async function getPart(executor: Executor, courseId: string, partId: string) {
  const actor = alias(users, "actor");
  const holder = alias(courseMemberships, "holder");
  const history = jsonRows(
    { ...getTableColumns(partEvents), actor: orNull({ name: actor.name }, actor.id) },
    sql`from ${partEvents} left join ${users} ${actor} on ${actor.id} = ${partEvents.actorId} where ${partEvents.partId} = ${parts.id}`,
    sql`${partEvents.createdAt} desc`,
  );
  const inKits = jsonRows(
    {
      ...getTableColumns(kitParts),
      kit: { id: kits.id, number: kits.number, state: kits.state, holder: orNull({ cohortId: holder.cohortId }, holder.id) },
    },
    sql`from ${kitParts} join ${kits} on ${kits.id} = ${kitParts.kitId} left join ${courseMemberships} ${holder} on ${holder.id} = ${kits.holderMembershipId}
      where ${kitParts.partId} = ${parts.id}`,
  );
  const [row] = await executor
    .select({ part: parts, events: history.column, kitParts: inKits.column })
    .from(parts)
    .where(and(eq(parts.id, partId), eq(parts.courseId, courseId)));
  return row ? { ...row.part, events: history.read(row.events), kitParts: inKits.read(row.kitParts) } : null;
}

/** A kit as a page names it: its number for every staff member, its id (and so a link) only for one who may open it. */
export type KitMention = { number: string; id: string | null };
const mentionKit = (access: CourseAccess, kit: { id: string; number: string; holder: { cohortId: string | null } | null }): KitMention => ({
  number: kit.number,
  id: canOpenKit(access, kit.holder?.cohortId) ? kit.id : null,
});

/**
 * What a part's page shows to `access`: the part with its history, the kit it is in, the checks it
 * raises against today's inventory (which may have changed since it was saved), and for a fluid lot the
 * calibration fit that the reductions use. Kits (the part's own, and those of its check-ins) are
 * mentioned as `mentionKit` allows; a fluid lot fills many kits and names none of them as its own.
 */
export async function getPartPage(executor: Executor, access: CourseAccess, partId: string) {
  const found = await getPart(executor, access.course.id, partId);
  if (!found) return null;
  const { kitParts: inKits, events, ...part } = found;
  const kit = inKits.find((entry) => entry.exclusive)?.kit;
  const checkInKitIds = [...new Set(events.map((event) => event.detail.kitId).filter((id): id is string => typeof id === "string"))];
  // Read back through the import mapping so the checks see exactly what a form or a file would give.
  const stored = csvRowToPartInput(partToCsvRow(part));
  const [inventory, checkInKits] = await Promise.all([
    stored.ok ? inventoryForChecks(executor, access.course.id) : Promise.resolve([]),
    checkInKitIds.length
      ? executor
          .select({ id: kits.id, number: kits.number, holder: { cohortId: courseMemberships.cohortId } })
          .from(kits)
          .leftJoin(courseMemberships, eq(courseMemberships.id, kits.holderMembershipId))
          .where(and(eq(kits.courseId, access.course.id), inArray(kits.id, checkInKitIds)))
      : Promise.resolve([]),
  ]);
  const checkInKit = new Map(checkInKits.map((entry) => [entry.id, mentionKit(access, entry)]));
  return {
    // A check-in's kit id stays on the server; the page gets the kit as the viewer may see it.
    part: {
      ...part,
      events: events.map(({ detail: { kitId, ...detail }, ...event }) => ({
        ...event,
        detail,
        kit: typeof kitId === "string" ? (checkInKit.get(kitId) ?? null) : null,
      })),
    },
    kit: kit ? mentionKit(access, kit) : null,
    warnings: stored.ok ? partWarnings(stored.input, inventory) : [],
    calibration: part.kind === "fluid_lot" ? fluidLotCalibration(part.calibration, part.glycerolMassFraction) : null,
  };
}

/** Every label the course uses, for the import preview's "already used" check. */
export async function listPartLabels(executor: Executor, courseId: string): Promise<string[]> {
  const rows = await executor.select({ label: parts.label }).from(parts).where(eq(parts.courseId, courseId)).orderBy(asc(parts.label));
  return rows.map((row) => row.label);
}

/** The whole inventory with each part's kit number, in one statement, for the CSV export. */
export async function listInventory(executor: Executor, courseId: string) {
  const rows = await executor
    .select({ part: parts, kitNumber: kits.number })
    .from(parts)
    // Fluid lots sit in many kits; only the exclusive parts name their one kit.
    .leftJoin(kitParts, and(eq(kitParts.partId, parts.id), eq(kitParts.exclusive, true)))
    .leftJoin(kits, eq(kits.id, kitParts.kitId))
    .where(eq(parts.courseId, courseId))
    .orderBy(asc(parts.kind), asc(parts.label));
  return rows.map(({ part, kitNumber }) => ({ ...part, kitNumber }));
}

/**
 * A CSV import, all or nothing: the rows are checked again here (the browser's preview is a
 * convenience, not a guarantee), then go in as one multi-row insert of parts and one of their
 * "created" events, in one transaction.
 */
export async function importParts(
  executor: Executor,
  { courseId, actorId, rows }: { courseId: string; actorId: string; rows: PartCsvRow[] },
): Promise<{ created: number; warnings: { label: string; warnings: PartWarning[] }[]; rejected: ImportRowCheck[] }> {
  try {
    return await executor.transaction(async (tx) => {
      const labels = rows.map((row) => (row.label ?? "").trim()).filter(Boolean);
      const taken = labels.length
        ? await tx
            .select({ label: parts.label })
            .from(parts)
            .where(and(eq(parts.courseId, courseId), inArray(parts.label, labels)))
        : [];
      const checks = checkImportRows(
        rows,
        taken.map((row) => row.label),
      );
      const rejected = checks.filter((check) => check.problems.length > 0);
      if (checks.length === 0) throw new AppError({ code: "empty_import", message: "The file has no parts in it." });
      // Refused as a whole, with each row's problems and its line in the file, for the page to list.
      if (rejected.length > 0) return { created: 0, warnings: [], rejected };
      const inputs = checks.map((check) => check.input!);

      // A sphere is checked against the fluids and columns already on the shelf and those arriving with it.
      const inventory = [
        ...(await inventoryForChecks(tx, courseId)),
        ...inputs.flatMap((input) =>
          input.kind === "fluid_lot" || input.kind === "column"
            ? [
                {
                  kind: input.kind,
                  label: input.label,
                  densityKgM3: input.kind === "fluid_lot" ? input.densityKgM3 : null,
                  innerDiameterMm: input.kind === "column" ? input.innerDiameterMm : null,
                },
              ]
            : [],
        ),
      ];
      const warningsByLabel = new Map(inputs.map((input) => [input.label, partWarnings(input, inventory)]));
      const created = await tx
        .insert(parts)
        .values(inputs.map((input) => ({ courseId, kind: input.kind, label: input.label, notes: input.notes, ...columnsFor(input) })))
        .returning({ id: parts.id, label: parts.label });
      await tx.insert(partEvents).values(
        created.map((part) => ({
          partId: part.id,
          actorId,
          action: "created",
          detail: { source: "csv-import" as const, warnings: warningsByLabel.get(part.label) ?? [] },
        })),
      );
      await recordAudit(
        tx,
        created.map((part) => ({
          action: "part.created" as const,
          actorId,
          courseId,
          subject: `part:${part.id}`,
          detail: { source: "csv-import" },
        })),
      );
      return {
        created: created.length,
        warnings: [...warningsByLabel].filter(([, warnings]) => warnings.length > 0).map(([label, warnings]) => ({ label, warnings })),
        rejected: [],
      };
    });
  } catch (error) {
    // Another instructor may have taken a label between the check and the insert.
    if (isUniqueViolation(error)) {
      // PostgreSQL names the clash as "Key (course_id, label)=(…, S-12) already exists."
      const detail = (error as { cause?: { detail?: string } }).cause?.detail ?? "";
      throw duplicateLabel(/\)=\([^,]*, (.*)\) already exists/.exec(detail)?.[1] ?? "of one of these parts", " Nothing was imported.");
    }
    throw error;
  }
}
