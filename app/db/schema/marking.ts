/**
 * Marking: a lab's rubric, one mark per student and lab, every change of a mark, and the lab's
 * marking state (ready for moderation, released to students). Points are plain numbers (two decimals).
 */
import { sql } from "drizzle-orm";
import {
  boolean,
  check,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import type { MarkScores, MarkState, ReleasedMarkSnapshot } from "../../lib/marking/marks";
import { autoRules, criterionKinds, type AutoRuleParams, type RubricLevel } from "../../lib/marking/rubric";
import { users } from "./accounts";
import { createdAt } from "./columns";
import { courseMemberships } from "./courses";
import { dropLogVersions, labs } from "./labs";

export const criterionKind = pgEnum("criterion_kind", criterionKinds);
export const autoRule = pgEnum("auto_rule", autoRules);
/** Where a mark change came from: one cell of the marking desk, a bulk action on many rows, or an instructor's moderation. */
export const markChangeSource = pgEnum("mark_change_source", ["desk", "bulk", "moderation"]);

/** One criterion of a lab's rubric. Scores in `marks.scores` are keyed by its id, so an edited rubric keeps them. */
export const rubricCriteria = pgTable(
  "rubric_criteria",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    position: integer("position").notNull(),
    title: text("title").notNull(),
    description: text("description").notNull().default(""),
    kind: criterionKind("kind").notNull(),
    /** Levels criteria only: picked by their 1-based number. */
    levels: jsonb("levels").$type<RubricLevel[]>(),
    /** The lowest and highest points: a range's bounds, a levels criterion's lowest and highest level, 0 and the maximum for an automatic one. */
    minPoints: doublePrecision("min_points").notNull().default(0),
    maxPoints: doublePrecision("max_points").notNull(),
    /** Automatic criteria only. */
    autoRule: autoRule("auto_rule"),
    autoParams: jsonb("auto_params")
      .$type<AutoRuleParams>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    index("rubric_criteria_lab_position_idx").on(table.labId, table.position),
    check("rubric_criteria_levels_only_for_levels", sql`(${table.kind} = 'levels') = (${table.levels} is not null)`),
    check("rubric_criteria_rule_only_for_auto", sql`(${table.kind} = 'auto') = (${table.autoRule} is not null)`),
    check("rubric_criteria_points_in_order", sql`${table.minPoints} >= 0 and ${table.maxPoints} >= ${table.minPoints}`),
  ],
);

/**
 * A student's mark for a lab. `scores` holds what was given by hand (levels, points, overrides of an
 * automatic criterion with their reason); until release the automatic criteria are computed on read
 * from the counted hand-in, and release writes them in (`frozen`), so a later hand-in by someone else
 * cannot change a released mark. `total` is as of the last write. `version` grows by one with every
 * change: a save names the version it started from, and a different one is a conflict.
 */
export const marks = pgTable(
  "marks",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    membershipId: uuid("membership_id")
      .notNull()
      .references(() => courseMemberships.id, { onDelete: "restrict" }),
    /** The counted drop-log version when the mark was last changed; null when nothing was handed in (a missing hand-in can be marked 0). */
    dropLogVersionId: uuid("drop_log_version_id").references(() => dropLogVersions.id, { onDelete: "restrict" }),
    /** That version's reduction revision when the mark was last changed: a later revision flags "result changed since it was marked". */
    reductionRevision: integer("reduction_revision"),
    scores: jsonb("scores")
      .$type<MarkScores>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    feedback: text("feedback").notNull().default(""),
    latePenaltyPoints: doublePrecision("late_penalty_points").notNull().default(0),
    total: doublePrecision("total").notNull().default(0),
    version: integer("version").notNull().default(1),
    /** Who last marked it at the desk (one cell or a bulk action): moderation keeps the marker, so each TA's distribution stays theirs. */
    markedById: uuid("marked_by_id").references(() => users.id, { onDelete: "set null" }),
    moderatedById: uuid("moderated_by_id").references(() => users.id, { onDelete: "set null" }),
    moderatedAt: timestamp("moderated_at", { withTimezone: true }),
    /** When students first could see it; null until the lab's marks are released with it among them. */
    releasedAt: timestamp("released_at", { withTimezone: true }),
    /** What the student saw at release, so a later change can be shown as "changed after release". */
    releasedSnapshot: jsonb("released_snapshot").$type<ReleasedMarkSnapshot>(),
    /**
     * Set when a hand-in after release (the lab's policy "reopen") made this released mark need re-marking;
     * `drop_log_version_id` still names the version it was marked on. Cleared when it is marked again.
     */
    reopenedAt: timestamp("reopened_at", { withTimezone: true }),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    uniqueIndex("marks_lab_membership_unique").on(table.labId, table.membershipId),
    index("marks_membership_idx").on(table.membershipId),
    index("marks_marked_by_idx").on(table.markedById),
  ],
);

/** Every change of a mark, never updated or deleted: who, when, the mark before and after, why, and from where. */
export const markChanges = pgTable(
  "mark_changes",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    markId: uuid("mark_id")
      .notNull()
      .references(() => marks.id, { onDelete: "cascade" }),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    membershipId: uuid("membership_id")
      .notNull()
      .references(() => courseMemberships.id, { onDelete: "restrict" }),
    changedById: uuid("changed_by_id").references(() => users.id, { onDelete: "set null" }),
    changedAt: timestamp("changed_at", { withTimezone: true }).notNull().defaultNow(),
    /** Null for the change that created the mark. */
    old: jsonb("old").$type<MarkState>(),
    new: jsonb("new").$type<MarkState>().notNull(),
    reason: text("reason"),
    source: markChangeSource("source").notNull(),
    /** The mark was already released: the student is shown this change and its reason. */
    afterRelease: boolean("after_release").notNull().default(false),
  },
  (table) => [
    index("mark_changes_mark_changed_idx").on(table.markId, table.changedAt),
    index("mark_changes_lab_changed_idx").on(table.labId, table.changedAt),
  ],
);

/** A lab's marking state: marked ready by an instructor (TAs then stop changing marks), and released to students. */
export const labMarking = pgTable("lab_marking", {
  labId: uuid("lab_id")
    .primaryKey()
    .references(() => labs.id, { onDelete: "cascade" }),
  readyAt: timestamp("ready_at", { withTimezone: true }),
  readyById: uuid("ready_by_id").references(() => users.id, { onDelete: "set null" }),
  /** The latest release; each release shows students the marks not shown yet. */
  releasedAt: timestamp("released_at", { withTimezone: true }),
  releasedById: uuid("released_by_id").references(() => users.id, { onDelete: "set null" }),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});
