/**
 * A class of hand-ins written straight into the database (users, memberships, drop logs and one version
 * each, in four bulk statements), for the class-comparison tests and benchmark. Figures are chosen by
 * the test; the other columns are only what the comparison reads.
 */
import { randomUUID } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import { courseMemberships, dropLogs, dropLogVersions, users } from "~/db/schema";
import type { DropLogInput } from "~/lib/drop-logs/drop-log-input";
import type { KitRecords, StoredReduction } from "~/lib/drop-logs/reduce-drop-log";
import { insertMany } from "~/server/bulk-insert.server";
import type { Executor } from "~/server/db.server";

export type ClassMember = { figure: number; sphereId?: string | null; fluidLotId?: string | null; cohortId?: string | null };

export async function seedClass(
  executor: Executor,
  {
    courseId,
    labId,
    cohortId,
    members,
    label,
  }: { courseId: string; labId: string; cohortId: string; members: ClassMember[]; label: string },
): Promise<string[]> {
  const rows = members.map((member, index) => ({
    ...member,
    userId: randomUUID(),
    membershipId: randomUUID(),
    dropLogId: randomUUID(),
    versionId: randomUUID(),
    index,
  }));
  await insertMany(
    executor,
    users,
    rows.map((row) => ({
      id: row.userId,
      email: `${label}-${row.index}@class.example`,
      name: `${label} student ${String(row.index).padStart(4, "0")}`,
    })),
  );
  await insertMany(
    executor,
    courseMemberships,
    rows.map((row) => ({
      id: row.membershipId,
      courseId,
      userId: row.userId,
      role: "student" as const,
      cohortId: row.cohortId ?? cohortId,
    })),
  );
  await insertMany(
    executor,
    dropLogs,
    rows.map((row) => ({ id: row.dropLogId, labId, membershipId: row.membershipId, latestVersionId: row.versionId })),
  );
  await insertMany(
    executor,
    dropLogVersions,
    rows.map((row) => ({
      id: row.versionId,
      dropLogId: row.dropLogId,
      version: 1,
      idempotencyKey: `${label}-${row.index}`,
      sphereId: row.sphereId ?? null,
      fluidLotId: row.fluidLotId ?? null,
      input: { temperatureC: 21 + (row.index % 4) } as DropLogInput,
      temperatureC: 21 + (row.index % 4),
      kitRecords: { fluidLot: { viscosityPaS: 1.2 } } as KitRecords,
      reduction: {} as StoredReduction,
      normalisedFigure: row.figure,
      reynolds: 0.05 + (row.index % 10) / 100,
      dragCoefficient: (24 / (0.05 + (row.index % 10) / 100)) * row.figure,
      viscosityPaS: 1.2 * row.figure,
    })),
  );
  return rows.map((row) => row.dropLogId);
}

/** A new latest version of a seeded drop log with another figure, as a re-hand-in would store it. */
export async function rehandIn(executor: Executor, dropLogId: string, figure: number): Promise<void> {
  const versionId = randomUUID();
  await executor.insert(dropLogVersions).values({
    id: versionId,
    dropLogId,
    version: sql`(select coalesce(max(version), 0) + 1 from drop_log_versions where drop_log_id = ${dropLogId})`,
    idempotencyKey: versionId,
    input: { temperatureC: 21 } as DropLogInput,
    temperatureC: 21,
    kitRecords: {} as KitRecords,
    reduction: {} as StoredReduction,
    normalisedFigure: figure,
  });
  await executor.update(dropLogs).set({ latestVersionId: versionId }).where(eq(dropLogs.id, dropLogId));
}

/** 37 figures spread evenly in log space within ±6 % of 1, the engine tests' quiet class. */
export const quietClass = (count = 37): number[] =>
  Array.from({ length: count }, (_, i) => Math.exp(((i - (count - 1) / 2) / ((count - 1) / 2)) * 0.06));
