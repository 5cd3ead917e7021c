/**
 * Getting kits to students and back at term scale: their postal addresses, shipments bought through the
 * carrier's API one label per kit, and the problems students report with a kit, followed to the end.
 */
import { sql } from "drizzle-orm";
import { check, customType, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { users } from "./accounts";
import { createdAt } from "./columns";
import { courseMemberships, courses, invitations } from "./courses";
import { kits, parts } from "./kits";

const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => "bytea" });

/**
 * A student's shipping address in one course: a member's, or an invited student's before they accept
 * (accepting moves it to the membership). Only instructors and the student see it; each view is audited.
 */
export const shippingAddresses = pgTable(
  "shipping_addresses",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    membershipId: uuid("membership_id").references(() => courseMemberships.id, { onDelete: "cascade" }),
    invitationId: uuid("invitation_id").references(() => invitations.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    line1: text("line1").notNull(),
    line2: text("line2"),
    city: text("city").notNull(),
    region: text("region"),
    postcode: text("postcode"),
    /** ISO 3166-1 alpha-2, upper case. */
    country: text("country").notNull(),
    phone: text("phone"),
    updatedById: uuid("updated_by_id").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    uniqueIndex("shipping_addresses_membership_unique").on(table.membershipId),
    uniqueIndex("shipping_addresses_invitation_unique").on(table.invitationId),
    index("shipping_addresses_course_idx").on(table.courseId),
    check("shipping_addresses_one_owner", sql`num_nonnulls(${table.membershipId}, ${table.invitationId}) = 1`),
  ],
);

/** `outbound`: kits to students; `return`: labels for kits coming back; `replacement`: a part sent for a problem. */
export const shipmentKind = pgEnum("shipment_kind", ["outbound", "return", "replacement"]);

/** One instructor's action over many kits. Its `requestKey` makes a resent form find the first one. */
export const shipments = pgTable(
  "shipments",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    kind: shipmentKind("kind").notNull(),
    requestKey: text("request_key").notNull(),
    createdById: uuid("created_by_id").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (table) => [uniqueIndex("shipments_course_request_key_unique").on(table.courseId, table.requestKey)],
);

/**
 * A label's journey for one kit: `queued` → `buying` → `bought`, or `failed` with the carrier's reason
 * (a retry puts it back to `queued`). `carrierShipmentId` is kept before buying, so a retry after a
 * lost answer asks the carrier whether the label was bought instead of buying a second one.
 */
export const labelStatus = pgEnum("label_status", ["queued", "buying", "bought", "failed"]);

export const shipmentItems = pgTable(
  "shipment_items",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    shipmentId: uuid("shipment_id")
      .notNull()
      .references(() => shipments.id, { onDelete: "cascade" }),
    kitId: uuid("kit_id")
      .notNull()
      .references(() => kits.id, { onDelete: "cascade" }),
    /** Set for a replacement: the problem it answers. */
    problemId: uuid("problem_id").references(() => kitProblems.id, { onDelete: "set null" }),
    status: labelStatus("status").notNull().default("queued"),
    carrierShipmentId: text("carrier_shipment_id"),
    carrier: text("carrier"),
    service: text("service"),
    trackingNumber: text("tracking_number"),
    labelPdf: bytea("label_pdf"),
    /** `refused_address`, `rate_limited`, `timeout` or `carrier_error`, with the carrier's words. */
    errorCode: text("error_code"),
    errorMessage: text("error_message"),
    attempts: integer("attempts").notNull().default(0),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    uniqueIndex("shipment_items_shipment_kit_unique").on(table.shipmentId, table.kitId),
    index("shipment_items_kit_idx").on(table.kitId),
  ],
);

export const kitProblemKind = pgEnum("kit_problem_kind", ["missing", "damaged", "incomplete"]);
export const kitProblemStatus = pgEnum("kit_problem_status", ["received", "replacement_sent", "resolved"]);

/** A student's report of a missing or damaged part (or an incomplete parcel), followed until resolved. */
export const kitProblems = pgTable(
  "kit_problems",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    kitId: uuid("kit_id")
      .notNull()
      .references(() => kits.id, { onDelete: "cascade" }),
    /** The student who reported it (and is told of each change). */
    membershipId: uuid("membership_id").references(() => courseMemberships.id, { onDelete: "set null" }),
    reportedById: uuid("reported_by_id").references(() => users.id, { onDelete: "set null" }),
    partId: uuid("part_id").references(() => parts.id, { onDelete: "set null" }),
    kind: kitProblemKind("kind").notNull(),
    note: text("note").notNull(),
    status: kitProblemStatus("status").notNull().default("received"),
    /** The part sent in place of the reported one, once a replacement went out. */
    replacementPartId: uuid("replacement_part_id").references(() => parts.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [index("kit_problems_course_status_idx").on(table.courseId, table.status), index("kit_problems_kit_idx").on(table.kitId)],
);

export type KitProblemUpdateDetail = { replacementPartId?: string; shipmentItemId?: string; replacementKitId?: string };

/** Each change of a problem's status, with who, when and what they wrote to the student. */
export const kitProblemUpdates = pgTable(
  "kit_problem_updates",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    problemId: uuid("problem_id")
      .notNull()
      .references(() => kitProblems.id, { onDelete: "cascade" }),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    fromStatus: kitProblemStatus("from_status"),
    toStatus: kitProblemStatus("to_status").notNull(),
    note: text("note"),
    detail: jsonb("detail")
      .$type<KitProblemUpdateDetail>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    createdAt: createdAt(),
  },
  (table) => [index("kit_problem_updates_problem_created_idx").on(table.problemId, table.createdAt)],
);
