/**
 * Kit inventory: measured parts, kits made of them, and the history of both.
 * Lengths are in mm and masses in g, as measured at the bench; the reduction converts to SI.
 */
import { sql } from "drizzle-orm";
import {
  boolean,
  check,
  date,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  real,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import { kitStates, type PartCondition } from "../../lib/kits/kit-states";
import { users } from "./accounts";
import { createdAt } from "./columns";
import { courseMemberships, courses, invitations } from "./courses";

export const partKind = pgEnum("part_kind", ["sphere", "fluid_lot", "column", "accessory"]);
export const partStatus = pgEnum("part_status", ["in_service", "remeasure", "retired"]);
export const kitState = pgEnum("kit_state", kitStates);

/** A calibration point of a fluid lot: viscosity measured at one temperature. */
export type CalibrationPoint = { temperatureC: number; viscosityPaS: number };

/**
 * Every part in one table, told apart by `kind`: the inventory, history, kit contents and imports
 * then treat parts alike, and a new experiment's part kind adds columns rather than tables.
 */
export const parts = pgTable(
  "parts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    kind: partKind("kind").notNull(),
    /** The course's own label, e.g. "S-12" or "GLY-2", unique within the course. */
    label: text("label").notNull(),
    status: partStatus("status").notNull().default("in_service"),
    notes: text("notes"),
    // sphere
    material: text("material"),
    diameterMm: real("diameter_mm"),
    diameterResolutionMm: real("diameter_resolution_mm"),
    massG: real("mass_g"),
    massResolutionG: real("mass_resolution_g"),
    // fluid lot
    fluidName: text("fluid_name"),
    densityKgM3: real("density_kg_m3"),
    /** Standard uncertainty of the density (kg/m³); null: taken as exact, so the budget shows no row for it. */
    densityUncertaintyKgM3: real("density_uncertainty_kg_m3"),
    /**
     * dρ/dT (kg/m³ per K, negative for liquids). With it, `density_kg_m3` is the density at 20 °C and a
     * reduction uses ρ(T) = ρ₂₀ + (dρ/dT)(T − 20 °C); null: the density is used at every temperature.
     */
    densityTemperatureCoefficientKgM3K: real("density_temperature_coefficient_kg_m3_k"),
    calibration: jsonb("calibration").$type<CalibrationPoint[]>(),
    /**
     * Set when the lot is a glycerol–water mix: glycerol's mass fraction, 0–1. The calibration is then
     * checked against handbook data; the reductions still use the calibration alone.
     */
    glycerolMassFraction: real("glycerol_mass_fraction"),
    // column
    innerDiameterMm: real("inner_diameter_mm"),
    /** Standard uncertainty of the bore (mm); null: the lab's diameter resolution/√12 is used. */
    innerDiameterUncertaintyMm: real("inner_diameter_uncertainty_mm"),
    timedDistanceMm: real("timed_distance_mm"),
    runInMm: real("run_in_mm"),
    marginBelowMm: real("margin_below_mm"),
    // accessory
    accessoryType: text("accessory_type"),
    /** A fluid lot's filled bottles on the shelf; packing a kit takes one. Null: not counted. */
    bottlesOnHand: integer("bottles_on_hand"),
    /**
     * When a value that enters reductions (d, m, density, calibration, bore, distances) last changed:
     * the part's bias then counts only figures revised after it, so a corrected part's flag can clear.
     */
    reductionChangedAt: timestamp("reduction_changed_at", { withTimezone: true }),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    uniqueIndex("parts_course_label_unique").on(table.courseId, table.label),
    index("parts_course_kind_idx").on(table.courseId, table.kind),
  ],
);

/**
 * A part event's detail, by action: `created` (the checks it raised, `source` for an import),
 * `remeasured` (each changed value, old and new, and the checks), `checked_in` (the kit, the part's condition).
 */
export type PartEventDetail = {
  warnings?: { field: string; message: string }[];
  source?: "csv-import";
  changed?: Record<string, { from: unknown; to: unknown }>;
  kitId?: string;
  condition?: PartCondition;
  remeasure?: boolean;
};

/** What happened to a part: created, re-measured (old and new values), sent for re-measurement, retired. */
export const partEvents = pgTable(
  "part_events",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    partId: uuid("part_id")
      .notNull()
      .references(() => parts.id, { onDelete: "cascade" }),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    action: text("action").notNull(),
    note: text("note"),
    detail: jsonb("detail")
      .$type<PartEventDetail>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    createdAt: createdAt(),
  },
  (table) => [index("part_events_part_created_idx").on(table.partId, table.createdAt)],
);

export const kits = pgTable(
  "kits",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    /** The number written on the box, unique within the course. */
    number: text("number").notNull(),
    state: kitState("state").notNull().default("on_shelf"),
    /** The student the kit is packed for or held by; cleared when it is checked in. */
    holderMembershipId: uuid("holder_membership_id").references(() => courseMemberships.id, { onDelete: "set null" }),
    /** Or the invited student it is packed for, before they accept; accepting moves it to the membership. */
    holderInvitationId: uuid("holder_invitation_id").references(() => invitations.id, { onDelete: "set null" }),
    carrier: text("carrier"),
    trackingNumber: text("tracking_number"),
    shippedOn: text("shipped_on"),
    /** The parcel back to the course, tracked like the outbound one. */
    returnCarrier: text("return_carrier"),
    returnTrackingNumber: text("return_tracking_number"),
    returnShippedOn: text("return_shipped_on"),
    /**
     * The day this kit must be back when it is not the course's return-by date: a student who left the
     * course, a kit swapped for a replacement. Null: the course's date.
     */
    returnBy: date("return_by", { mode: "string" }),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    uniqueIndex("kits_course_number_unique").on(table.courseId, table.number),
    // One active kit per student per course (a membership belongs to exactly one course); a kit coming
    // back does not count, so a replacement kit can go out before the first is home.
    uniqueIndex("kits_holder_unique")
      .on(table.holderMembershipId)
      .where(sql`${table.holderMembershipId} is not null and ${table.state} <> 'coming_back'`),
    uniqueIndex("kits_holder_invitation_unique")
      .on(table.holderInvitationId)
      .where(sql`${table.holderInvitationId} is not null and ${table.state} <> 'coming_back'`),
    check("kits_one_holder", sql`num_nonnulls(${table.holderMembershipId}, ${table.holderInvitationId}) <= 1`),
    index("kits_course_state_idx").on(table.courseId, table.state),
  ],
);

/**
 * Which parts a kit holds. A sphere, column or accessory sits in at most one kit at a time; a fluid lot
 * fills the bottles of many kits, so its rows are not `exclusive`.
 */
export const kitParts = pgTable(
  "kit_parts",
  {
    kitId: uuid("kit_id")
      .notNull()
      .references(() => kits.id, { onDelete: "cascade" }),
    partId: uuid("part_id")
      .notNull()
      .references(() => parts.id, { onDelete: "restrict" }),
    exclusive: boolean("exclusive").notNull().default(true),
  },
  (table) => [
    primaryKey({ columns: [table.kitId, table.partId] }),
    uniqueIndex("kit_parts_exclusive_part_unique")
      .on(table.partId)
      .where(sql`${table.exclusive}`),
    index("kit_parts_part_idx").on(table.partId),
  ],
);

/**
 * A kit event's detail, by action: `created` (its parts), `moved` (the holder after, the shipping),
 * `checked_in` (each part's condition, those sent for re-measurement), `reported` (the part and the problem).
 */
export type KitEventDetail = {
  partIds?: string[];
  holderMembershipId?: string | null;
  shipping?: { carrier: string; trackingNumber: string; shippedOn: string };
  conditions?: Record<string, PartCondition>;
  remeasure?: string[];
  partId?: string | null;
  problem?: "missing" | "damaged" | "incomplete";
};

/** Every change of a kit's state (and every report about it), with who, when and why. */
export const kitEvents = pgTable(
  "kit_events",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    kitId: uuid("kit_id")
      .notNull()
      .references(() => kits.id, { onDelete: "cascade" }),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    fromState: kitState("from_state"),
    toState: kitState("to_state"),
    /** `moved`, `assigned`, `reported` (a student's missing or damaged part), `checked_in`. */
    action: text("action").notNull(),
    note: text("note"),
    detail: jsonb("detail")
      .$type<KitEventDetail>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    createdAt: createdAt(),
  },
  (table) => [index("kit_events_kit_created_idx").on(table.kitId, table.createdAt)],
);
