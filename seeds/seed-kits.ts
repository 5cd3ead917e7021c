/**
 * The demo kit inventory: measured spheres of three sizes and two materials, two fluid lots with
 * calibration points, a column per kit, accessories, and 48 kits spread over every state of the
 * journey with their history. The values are invented but physically plausible; they are demo data,
 * never a test's expected value.
 */
import type { Faker } from "@faker-js/faker";
import { kitEvents, kitParts, kits, partEvents, parts } from "~/db/schema";
import type { KitState } from "~/lib/kits/kit-states";
import type { Transaction } from "~/server/db.server";
import { calendarDayIn } from "~/lib/format-date";
import { demoCourse } from "./demo-scenario";

const KIT_COUNT = 48;

/** Nominal sizes with the density of their material, measured with a 0.001 mm micrometer and a 1 mg balance. */
const sphereSizes = [
  { prefix: "S3", material: "steel", diameterMm: 3.0, densityKgM3: 7820 },
  { prefix: "S4", material: "steel", diameterMm: 4.0, densityKgM3: 7820 },
  { prefix: "G6", material: "glass", diameterMm: 6.0, densityKgM3: 2500 },
] as const;

/** Where each kit is on its journey: most at home, a few in every other state. */
const journey: KitState[] = [
  ...Array<KitState>(38).fill("at_home"),
  "on_shelf",
  "on_shelf",
  "packed",
  "packed",
  "in_transit",
  "in_transit",
  "coming_back",
  "coming_back",
  "checked_in",
  "retired",
];

const pathTo: Record<KitState, KitState[]> = {
  on_shelf: [],
  packed: ["packed"],
  in_transit: ["packed", "in_transit"],
  at_home: ["packed", "in_transit", "at_home"],
  coming_back: ["packed", "in_transit", "at_home", "coming_back"],
  checked_in: ["packed", "in_transit", "at_home", "coming_back", "checked_in"],
  retired: ["packed", "in_transit", "at_home", "coming_back", "checked_in", "retired"],
};

/** Demo history is dated back from the day the demo is seeded, so "shipped last week" stays true. */
const daysAgo = (days: number, minutes = 0) => new Date(Date.now() - days * 86_400_000 + minutes * 60_000);

// Every kit's history starts three weeks ago with one step every three days: on shelf, packed, in transit, …
const historyStartDaysAgo = 21;
const daysPerStep = 3;
/** The day a kit was sent is the day it moved to in transit (the third step); the Thursday shipment uses it too. */
export const KIT_SENT_DAYS_AGO = historyStartDaysAgo - 2 * daysPerStep;

export async function seedKits(
  tx: Transaction,
  faker: Faker,
  { courseId, instructorId, studentMembershipIds }: { courseId: string; instructorId: string; studentMembershipIds: string[] },
): Promise<void> {
  const round = (value: number, step: number) => Math.round(value / step) * step;
  const sphereRows = Array.from({ length: KIT_COUNT }, (_, kit) =>
    sphereSizes.map((size) => {
      // Real balls are within a few micrometres of nominal; the balance reads to 1 mg.
      const diameterMm = round(size.diameterMm + faker.number.float({ min: -0.004, max: 0.004 }), 0.001);
      const massG = round((size.densityKgM3 * Math.PI * (diameterMm / 1000) ** 3 * 1000) / 6, 0.001);
      return {
        courseId,
        kind: "sphere" as const,
        label: `${size.prefix}-${String(kit + 1).padStart(2, "0")}`,
        material: size.material,
        diameterMm: Number(diameterMm.toFixed(3)),
        diameterResolutionMm: 0.001,
        massG: Number(massG.toFixed(3)),
        massResolutionG: 0.001,
      };
    }),
  ).flat();

  const fluidRows = [
    {
      courseId,
      kind: "fluid_lot" as const,
      label: "GLY-95A",
      fluidName: "Glycerol–water, 95 % glycerol by mass",
      densityKgM3: 1249,
      glycerolMassFraction: 0.95,
      calibration: [
        { temperatureC: 15, viscosityPaS: 0.82 },
        { temperatureC: 20, viscosityPaS: 0.545 },
        { temperatureC: 25, viscosityPaS: 0.37 },
        { temperatureC: 30, viscosityPaS: 0.26 },
      ],
    },
    {
      courseId,
      kind: "fluid_lot" as const,
      label: "SYR-2B",
      fluidName: "Glucose syrup, diluted",
      densityKgM3: 1380,
      calibration: [
        { temperatureC: 15, viscosityPaS: 4.1 },
        { temperatureC: 20, viscosityPaS: 2.6 },
        { temperatureC: 25, viscosityPaS: 1.7 },
      ],
    },
  ];

  const columnRows = Array.from({ length: KIT_COUNT }, (_, kit) => ({
    courseId,
    kind: "column" as const,
    label: `C-${String(kit + 1).padStart(2, "0")}`,
    innerDiameterMm: Number(round(40 + faker.number.float({ min: -0.3, max: 0.3 }), 0.05).toFixed(2)),
    timedDistanceMm: 300,
    runInMm: 120,
    marginBelowMm: 60,
  }));

  const accessoryRows = Array.from({ length: KIT_COUNT }, (_, kit) => [
    { courseId, kind: "accessory" as const, label: `MAG-${String(kit + 1).padStart(2, "0")}`, accessoryType: "retrieval magnet" },
    { courseId, kind: "accessory" as const, label: `THM-${String(kit + 1).padStart(2, "0")}`, accessoryType: "thermometer" },
  ]).flat();

  const inserted = await tx
    .insert(parts)
    .values([...sphereRows, ...fluidRows, ...columnRows, ...accessoryRows])
    .returning({ id: parts.id, label: parts.label, kind: parts.kind });
  await tx.insert(partEvents).values(inserted.map((part) => ({ partId: part.id, actorId: instructorId, action: "created" })));
  const idOf = new Map(inserted.map((part) => [part.label, part.id]));

  // Each kit's moves, dated first so that its "sent" day is the day of its move to in transit.
  let minute = 0;
  const histories = journey.map((state) =>
    (["on_shelf", ...pathTo[state]] as KitState[]).map((toState, step) => ({
      toState,
      // The latest no later than yesterday, a few minutes apart so the timeline has an order.
      at: daysAgo(historyStartDaysAgo - step * daysPerStep, (minute++ % 50) + 5),
    })),
  );
  const sentOn = (index: number) => {
    const sent = histories[index].find((move) => move.toState === "in_transit");
    return sent ? calendarDayIn(sent.at, demoCourse.timeZone) : null;
  };

  const kitRows = await tx
    .insert(kits)
    .values(
      journey.map((state, index) => {
        const holding = state !== "on_shelf" && state !== "checked_in" && state !== "retired";
        const shipped = ["in_transit", "at_home", "coming_back"].includes(state);
        return {
          courseId,
          number: `K-${String(index + 1).padStart(2, "0")}`,
          state,
          holderMembershipId: holding ? studentMembershipIds[index] : null,
          carrier: shipped ? "Parcelwise" : null,
          trackingNumber: shipped ? `PW${faker.string.numeric(10)}` : null,
          shippedOn: shipped ? sentOn(index) : null,
        };
      }),
    )
    .returning({ id: kits.id, number: kits.number, state: kits.state, holderMembershipId: kits.holderMembershipId });

  const two = (index: number) => String(index + 1).padStart(2, "0");
  // Kits alternate between the two fluid lots, so that both labs' fluids are in use.
  await tx.insert(kitParts).values(
    kitRows.flatMap((kit, index) => [
      ...[`S3-${two(index)}`, `S4-${two(index)}`, `G6-${two(index)}`, `C-${two(index)}`, `MAG-${two(index)}`, `THM-${two(index)}`].map(
        (label) => ({
          kitId: kit.id,
          partId: idOf.get(label)!,
        }),
      ),
      { kitId: kit.id, partId: idOf.get("GLY-95A")!, exclusive: false },
      { kitId: kit.id, partId: idOf.get("SYR-2B")!, exclusive: false },
    ]),
  );

  await tx.insert(kitEvents).values(
    kitRows.flatMap((kit, index) =>
      histories[index].map((move, step) => ({
        kitId: kit.id,
        actorId: instructorId,
        fromState: step === 0 ? null : histories[index][step - 1].toState,
        toState: move.toState,
        action: step === 0 ? "created" : "moved",
        detail: { holderMembershipId: kit.holderMembershipId },
        createdAt: move.at,
      })),
    ),
  );
}
