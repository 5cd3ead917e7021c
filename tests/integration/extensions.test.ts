/**
 * Extensions: a student's own extension, else their cohort's, else the lab's times decide whether a
 * hand-in is on time, late or refused, across the daylight-saving change in Europe/Dublin
 * (2027-03-28 01:00 UTC, when Irish clocks go from 01:00 GMT to 02:00 IST: timeanddate.com, Dublin).
 */
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { courses, labCohorts, labExtensions, labs } from "~/db/schema";
import { wallClockToInstant } from "~/lib/labs/wall-clock";
import type { CourseAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { HandInRefusedError, handInDropLog, loadStudentLab } from "~/server/drop-logs/hand-in.server";
import { listLabsForMember } from "~/server/drop-logs/lab-list.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";

let fixture: AccessFixture;
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };
function dublin(wall: string): Date {
  const result = wallClockToInstant(wall, "Europe/Dublin");
  if (!result.ok) throw new Error(`not a Dublin wall-clock time: ${wall}`);
  return result.instant;
}
// The class is due at 00:30 local on the night the clocks change (still GMT), with no late hand-ins.
const classDue = dublin("2027-03-28T00:30");
// The extension is due at 09:00 local the same morning, which is already IST (UTC+1): 08:00 UTC.
const extendedDue = dublin("2027-03-28T09:00");

function studentAccess(): CourseAccess {
  return {
    user: { id: fixture.userIds.ownStudent, email: "ownstudent@extensions.example", name: "ownStudent", sessionId: null, via: "session" },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "ext-A", term: "Test term", timeZone: "Europe/Dublin" },
    membership: { id: fixture.membershipIds.ownStudent, role: "student", cohortId: fixture.cohortId },
    cohortIds: [fixture.cohortId],
  } as unknown as CourseAccess;
}

async function createLab() {
  const [lab] = await db
    .insert(labs)
    .values({ courseId: fixture.courseId, title: "Extended lab", kind: "drag", status: "published", opensAt: dublin("2027-03-20T09:00"), dueAt: classDue, requiredDrops: 5, resolutions })
    .returning();
  await db.insert(labCohorts).values({ labId: lab.id, cohortId: fixture.cohortId });
  return lab;
}

const handIn = (labId: string, key: string, now: Date) =>
  handInDropLog(db, { access: studentAccess(), labId, input: { sphereId: fixture.sphereId, temperatureC: 22.4, drops: [7.41, 7.52, 7.47, 7.38, 7.5] }, idempotencyKey: key, now });

beforeAll(async () => {
  fixture = await createAccessFixture("extensions");
  await db.update(courses).set({ timeZone: "Europe/Dublin" }).where(eq(courses.id, fixture.courseId));
});

describe("hand-ins under an extension", () => {
  it("converts the local due times across the clock change as expected", () => {
    expect(classDue.toISOString()).toBe("2027-03-28T00:30:00.000Z");
    expect(extendedDue.toISOString()).toBe("2027-03-28T08:00:00.000Z");
  });

  it("refuses after the class deadline without an extension", async () => {
    const lab = await createLab();
    await expect(handIn(lab.id, "ext-none-1", new Date("2027-03-28T07:30:00Z"))).rejects.toBeInstanceOf(HandInRefusedError);
  });

  it("takes a hand-in after the class deadline as on time under the student's own extension, late up to its cut-off, refused after", async () => {
    const lab = await createLab();
    await db.insert(labExtensions).values({ labId: lab.id, membershipId: fixture.membershipIds.ownStudent, dueAt: extendedDue, lateCutoffAt: dublin("2027-03-28T12:00"), reason: "Illness" });
    // 07:59 UTC is 08:59 IST: before the extended due time, though after it by GMT wall reading.
    const onTime = await handIn(lab.id, "ext-own-1", new Date("2027-03-28T07:59:00Z"));
    expect(onTime.version.late).toBe(false);
    const late = await handIn(lab.id, "ext-own-2", new Date("2027-03-28T08:01:00Z"));
    expect(late.version.late).toBe(true);
    await expect(handIn(lab.id, "ext-own-3", new Date("2027-03-28T11:01:00Z"))).rejects.toMatchObject({ code: "past_cutoff" });
  });

  it("prefers the student's own extension over the cohort's", async () => {
    const lab = await createLab();
    await db.insert(labExtensions).values([
      { labId: lab.id, cohortId: fixture.cohortId, dueAt: dublin("2027-03-29T09:00"), reason: "Kits shipped late" },
      { labId: lab.id, membershipId: fixture.membershipIds.ownStudent, dueAt: extendedDue, reason: "Illness" },
    ]);
    // After the student's own due time (no cut-off) but before the cohort's: the student's own wins, so refused.
    await expect(handIn(lab.id, "ext-prec-1", new Date("2027-03-28T09:00Z"))).rejects.toMatchObject({ code: "past_cutoff" });
    await db.delete(labExtensions).where(eq(labExtensions.membershipId, fixture.membershipIds.ownStudent));
    // With only the cohort's extension left, the same instant is on time.
    const cohortOnly = await handIn(lab.id, "ext-prec-2", new Date("2027-03-28T09:00Z"));
    expect(cohortOnly.version.late).toBe(false);
  });

  it("shows the student their own due time and cut-off on the lab list and the lab page", async () => {
    const lab = await createLab();
    const cutoff = dublin("2027-03-28T12:00");
    await db.insert(labExtensions).values({ labId: lab.id, membershipId: fixture.membershipIds.ownStudent, dueAt: extendedDue, lateCutoffAt: cutoff, reason: "Illness" });
    const row = (await listLabsForMember(db, studentAccess())).find((candidate) => candidate.id === lab.id);
    expect(row && new Date(row.dueAt).toISOString()).toBe(extendedDue.toISOString());
    expect(row?.lateCutoffAt && new Date(row.lateCutoffAt).toISOString()).toBe(cutoff.toISOString());
    const context = await loadStudentLab(db, studentAccess(), lab.id);
    expect(context.window).toMatchObject({ dueAt: extendedDue, lateCutoffAt: cutoff, extendedBy: "student" });
  });
});
