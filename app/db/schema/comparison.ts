/**
 * Class comparison: the label each counted hand-in carries, written by the relabel job (never by a
 * hand-in, so that a hand-in locks no other student's rows), and every change of it.
 */
import { index, jsonb, pgEnum, pgTable, real, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { dropLogVersions, labs } from "./labs";

export const comparisonLabel = pgEnum("comparison_label", ["consistent", "suspect", "outlier"]);

/** The method and parameters a label was computed with, as the lab had them then. */
export type ComparisonMethodSettings = { method: "grubbs" | "esd" | "iqr"; alpha: number; maxOutliers: number; k: number };

export const comparisonLabels = pgTable(
  "comparison_labels",
  {
    /**
     * One current label per drop log: the one of its latest counted version. No foreign key on purpose:
     * its check would take a key-share lock on every drop_logs row of the lab while the job relabels,
     * and a hand-in's `select … for update` of its own drop log would then wait for the job.
     */
    dropLogId: uuid("drop_log_id").primaryKey(),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    versionId: uuid("version_id")
      .notNull()
      .references(() => dropLogVersions.id, { onDelete: "cascade" }),
    figure: real("figure").notNull(),
    label: comparisonLabel("label").notNull(),
    reason: text("reason").notNull(),
    method: jsonb("method").$type<ComparisonMethodSettings>().notNull(),
    computedAt: timestamp("computed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [index("comparison_labels_lab_idx").on(table.labId)],
);

/** A hand-in's label history: a row each time its label (or the version it labels) changes. */
export const comparisonLabelChanges = pgTable(
  "comparison_label_changes",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    /** No foreign key, for the reason given on `comparison_labels.drop_log_id`. */
    dropLogId: uuid("drop_log_id").notNull(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => dropLogVersions.id, { onDelete: "cascade" }),
    /** Null for the first label a hand-in gets. */
    fromLabel: comparisonLabel("from_label"),
    toLabel: comparisonLabel("to_label").notNull(),
    reason: text("reason").notNull(),
    method: jsonb("method").$type<ComparisonMethodSettings>().notNull(),
    changedAt: timestamp("changed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    index("comparison_label_changes_log_idx").on(table.dropLogId, table.changedAt),
    index("comparison_label_changes_lab_idx").on(table.labId),
  ],
);
