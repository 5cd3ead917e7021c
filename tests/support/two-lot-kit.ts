/**
 * A student of the access fixture's cohort one whose kit holds two spheres, two fluid lots (the
 * fixture's shared F-1 and a second bottle F-2 with other records) and two columns, plus a sphere and a
 * lot of the course that are in no kit: the cast for the tests of which parts a hand-in may name.
 */
import { and, eq } from "drizzle-orm";
import { courseMemberships, kitParts, kits, parts, users } from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import type { AccessFixture } from "./access-fixture";

export type TwoLotKit = {
  userId: string;
  access: CourseAccess;
  kitId: string;
  kitNumber: string;
  spheres: [string, string];
  /** F-1 (the fixture's, density 1260 kg/m³) and F-2 (density 1150 kg/m³). */
  fluidLots: [string, string];
  columns: [string, string];
  /** Parts of the course in none of this student's kits. */
  foreignSphereId: string;
  foreignFluidLotId: string;
  foreignColumnId: string;
};

export const SECOND_LOT_DENSITY = 1150;

export async function createTwoLotKit(fixture: AccessFixture, label: string): Promise<TwoLotKit> {
  const [user] = await db
    .insert(users)
    .values({ email: `two-lots@${label}.example`, name: "Test twoLotStudent" })
    .returning();
  const [membership] = await db
    .insert(courseMemberships)
    .values({ courseId: fixture.courseId, userId: user.id, role: "student", cohortId: fixture.cohortId })
    .returning();
  const [sharedLot] = await db
    .select({ id: parts.id })
    .from(parts)
    .where(and(eq(parts.courseId, fixture.courseId), eq(parts.kind, "fluid_lot"), eq(parts.label, "F-1")));
  const [sphereA, sphereB, lotB, columnA, columnB, foreignSphere, foreignLot, foreignColumn] = await db
    .insert(parts)
    .values([
      { courseId: fixture.courseId, kind: "sphere", label: "S-3", material: "steel", diameterMm: 3, massG: 0.11 },
      { courseId: fixture.courseId, kind: "sphere", label: "S-4", material: "steel", diameterMm: 4, massG: 0.261 },
      {
        courseId: fixture.courseId,
        kind: "fluid_lot",
        label: "F-2",
        fluidName: "glycerol–water",
        densityKgM3: SECOND_LOT_DENSITY,
        calibration: [
          { temperatureC: 20, viscosityPaS: 0.9 },
          { temperatureC: 25, viscosityPaS: 0.6 },
        ],
      },
      { courseId: fixture.courseId, kind: "column", label: "C-3", innerDiameterMm: 40, timedDistanceMm: 200, runInMm: 100 },
      { courseId: fixture.courseId, kind: "column", label: "C-4", innerDiameterMm: 50, timedDistanceMm: 250, runInMm: 100 },
      { courseId: fixture.courseId, kind: "sphere", label: "S-9", material: "steel", diameterMm: 3, massG: 0.11 },
      {
        courseId: fixture.courseId,
        kind: "fluid_lot",
        label: "F-9",
        fluidName: "syrup",
        densityKgM3: 1380,
        calibration: [{ temperatureC: 20, viscosityPaS: 2.6 }],
      },
      { courseId: fixture.courseId, kind: "column", label: "C-9", innerDiameterMm: 40, timedDistanceMm: 200, runInMm: 100 },
    ])
    .returning();
  const [kit] = await db
    .insert(kits)
    .values({ courseId: fixture.courseId, number: "K-03", state: "at_home", holderMembershipId: membership.id })
    .returning();
  await db.insert(kitParts).values([
    { kitId: kit.id, partId: sphereA.id },
    { kitId: kit.id, partId: sphereB.id },
    { kitId: kit.id, partId: columnA.id },
    { kitId: kit.id, partId: columnB.id },
    { kitId: kit.id, partId: sharedLot.id, exclusive: false },
    { kitId: kit.id, partId: lotB.id, exclusive: false },
  ]);
  const access = {
    user: { id: user.id, email: user.email, name: user.name, sessionId: null, via: "session" },
    course: { id: fixture.courseId, title: "Settling Spheres", code: `${label}-A`, term: "Test term", timeZone: "UTC" },
    membership: { id: membership.id, role: "student", cohortId: fixture.cohortId },
    cohortIds: [fixture.cohortId],
  } as unknown as CourseAccess;
  return {
    userId: user.id,
    access,
    kitId: kit.id,
    kitNumber: kit.number,
    spheres: [sphereA.id, sphereB.id],
    fluidLots: [sharedLot.id, lotB.id],
    columns: [columnA.id, columnB.id],
    foreignSphereId: foreignSphere.id,
    foreignFluidLotId: foreignLot.id,
    foreignColumnId: foreignColumn.id,
  };
}
