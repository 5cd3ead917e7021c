CREATE TYPE "public"."after_release_hand_ins" AS ENUM('refuse', 'reopen');--> statement-breakpoint
CREATE TABLE "reduction_revisions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"version_id" uuid NOT NULL,
	"revision" integer NOT NULL,
	"kit_records" jsonb NOT NULL,
	"reduction" jsonb NOT NULL,
	"normalised_figure" real,
	"reynolds" real,
	"drag_coefficient" real,
	"viscosity_pa_s" real,
	"warning_count" integer DEFAULT 0 NOT NULL,
	"cause" jsonb,
	"part_event_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "rereduction_runs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"part_id" uuid NOT NULL,
	"part_event_id" uuid NOT NULL,
	"total" integer NOT NULL,
	"done" integer DEFAULT 0 NOT NULL,
	"finished_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD COLUMN "current_revision" integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "labs" ADD COLUMN "after_release_hand_ins" "after_release_hand_ins" DEFAULT 'refuse' NOT NULL;--> statement-breakpoint
ALTER TABLE "marks" ADD COLUMN "reduction_revision" integer;--> statement-breakpoint
ALTER TABLE "marks" ADD COLUMN "reopened_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "density_uncertainty_kg_m3" real;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "density_temperature_coefficient_kg_m3_k" real;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "inner_diameter_uncertainty_mm" real;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "reduction_changed_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "reduction_revisions" ADD CONSTRAINT "reduction_revisions_version_id_drop_log_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."drop_log_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reduction_revisions" ADD CONSTRAINT "reduction_revisions_part_event_id_part_events_id_fk" FOREIGN KEY ("part_event_id") REFERENCES "public"."part_events"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "rereduction_runs" ADD CONSTRAINT "rereduction_runs_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "rereduction_runs" ADD CONSTRAINT "rereduction_runs_part_id_parts_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."parts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "rereduction_runs" ADD CONSTRAINT "rereduction_runs_part_event_id_part_events_id_fk" FOREIGN KEY ("part_event_id") REFERENCES "public"."part_events"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "reduction_revisions_version_revision_unique" ON "reduction_revisions" USING btree ("version_id","revision");--> statement-breakpoint
CREATE UNIQUE INDEX "reduction_revisions_version_event_unique" ON "reduction_revisions" USING btree ("version_id","part_event_id");--> statement-breakpoint
CREATE UNIQUE INDEX "rereduction_runs_event_unique" ON "rereduction_runs" USING btree ("part_event_id");--> statement-breakpoint
CREATE INDEX "rereduction_runs_part_idx" ON "rereduction_runs" USING btree ("part_id","created_at");--> statement-breakpoint
CREATE INDEX "drop_log_versions_fluid_lot_idx" ON "drop_log_versions" USING btree ("fluid_lot_id");--> statement-breakpoint
CREATE INDEX "drop_log_versions_column_idx" ON "drop_log_versions" USING btree ("column_id");--> statement-breakpoint
-- Versions handed in before revisions existed: their stored reduction is revision 1.
INSERT INTO "reduction_revisions" ("version_id", "revision", "kit_records", "reduction", "normalised_figure", "reynolds", "drag_coefficient", "viscosity_pa_s", "warning_count", "created_at")
SELECT "id", 1, "kit_records", "reduction", "normalised_figure", "reynolds", "drag_coefficient", "viscosity_pa_s", "warning_count", "submitted_at" FROM "drop_log_versions";
