CREATE TYPE "public"."experiment_kind" AS ENUM('drag', 'viscometry');--> statement-breakpoint
CREATE TYPE "public"."lab_status" AS ENUM('draft', 'published', 'closed');--> statement-breakpoint
CREATE TABLE "drop_log_photos" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"drop_log_id" uuid NOT NULL,
	"version_id" uuid,
	"storage_key" text NOT NULL,
	"content_type" text NOT NULL,
	"bytes" integer NOT NULL,
	"original_name" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "drop_log_versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"drop_log_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"idempotency_key" text NOT NULL,
	"submitted_by_id" uuid,
	"submitted_at" timestamp with time zone DEFAULT now() NOT NULL,
	"late" boolean DEFAULT false NOT NULL,
	"sphere_id" uuid,
	"fluid_lot_id" uuid,
	"column_id" uuid,
	"input" jsonb NOT NULL,
	"kit_records" jsonb NOT NULL,
	"reduction" jsonb NOT NULL,
	"normalised_figure" real,
	"reynolds" real,
	"drag_coefficient" real,
	"viscosity_pa_s" real,
	"warning_count" integer DEFAULT 0 NOT NULL
);
--> statement-breakpoint
CREATE TABLE "drop_logs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"membership_id" uuid NOT NULL,
	"latest_version_id" uuid,
	"draft" jsonb,
	"draft_saved_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "lab_cohorts" (
	"lab_id" uuid NOT NULL,
	"cohort_id" uuid NOT NULL,
	CONSTRAINT "lab_cohorts_lab_id_cohort_id_pk" PRIMARY KEY("lab_id","cohort_id")
);
--> statement-breakpoint
CREATE TABLE "lab_reminders" (
	"lab_id" uuid NOT NULL,
	"membership_id" uuid NOT NULL,
	"offset_hours" integer NOT NULL,
	"outbox_id" uuid,
	"sent_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "lab_reminders_lab_id_membership_id_offset_hours_pk" PRIMARY KEY("lab_id","membership_id","offset_hours")
);
--> statement-breakpoint
CREATE TABLE "labs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"title" text NOT NULL,
	"kind" "experiment_kind" NOT NULL,
	"status" "lab_status" DEFAULT 'draft' NOT NULL,
	"instructions" text DEFAULT '' NOT NULL,
	"opens_at" timestamp with time zone NOT NULL,
	"due_at" timestamp with time zone NOT NULL,
	"late_cutoff_at" timestamp with time zone,
	"required_drops" integer DEFAULT 10 NOT NULL,
	"allowed_part_ids" uuid[] DEFAULT '{}'::uuid[] NOT NULL,
	"wall_correction" text DEFAULT 'faxen' NOT NULL,
	"drag_model" text DEFAULT 'schiller-naumann' NOT NULL,
	"comparison_method" text DEFAULT 'grubbs' NOT NULL,
	"comparison_alpha" real DEFAULT 0.05 NOT NULL,
	"comparison_max_outliers" integer DEFAULT 3 NOT NULL,
	"comparison_k" real DEFAULT 1.5 NOT NULL,
	"resolutions" jsonb NOT NULL,
	"reminder_offsets_hours" integer[] DEFAULT '{48,6}'::integer[] NOT NULL,
	"published_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "drop_log_photos" ADD CONSTRAINT "drop_log_photos_drop_log_id_drop_logs_id_fk" FOREIGN KEY ("drop_log_id") REFERENCES "public"."drop_logs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_photos" ADD CONSTRAINT "drop_log_photos_version_id_drop_log_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."drop_log_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD CONSTRAINT "drop_log_versions_drop_log_id_drop_logs_id_fk" FOREIGN KEY ("drop_log_id") REFERENCES "public"."drop_logs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD CONSTRAINT "drop_log_versions_submitted_by_id_users_id_fk" FOREIGN KEY ("submitted_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD CONSTRAINT "drop_log_versions_sphere_id_parts_id_fk" FOREIGN KEY ("sphere_id") REFERENCES "public"."parts"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD CONSTRAINT "drop_log_versions_fluid_lot_id_parts_id_fk" FOREIGN KEY ("fluid_lot_id") REFERENCES "public"."parts"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD CONSTRAINT "drop_log_versions_column_id_parts_id_fk" FOREIGN KEY ("column_id") REFERENCES "public"."parts"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_logs" ADD CONSTRAINT "drop_logs_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_logs" ADD CONSTRAINT "drop_logs_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_cohorts" ADD CONSTRAINT "lab_cohorts_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_cohorts" ADD CONSTRAINT "lab_cohorts_cohort_id_cohorts_id_fk" FOREIGN KEY ("cohort_id") REFERENCES "public"."cohorts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_reminders" ADD CONSTRAINT "lab_reminders_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_reminders" ADD CONSTRAINT "lab_reminders_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "labs" ADD CONSTRAINT "labs_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "drop_log_photos_log_idx" ON "drop_log_photos" USING btree ("drop_log_id");--> statement-breakpoint
CREATE UNIQUE INDEX "drop_log_versions_log_version_unique" ON "drop_log_versions" USING btree ("drop_log_id","version");--> statement-breakpoint
CREATE UNIQUE INDEX "drop_log_versions_log_key_unique" ON "drop_log_versions" USING btree ("drop_log_id","idempotency_key");--> statement-breakpoint
CREATE INDEX "drop_log_versions_sphere_idx" ON "drop_log_versions" USING btree ("sphere_id");--> statement-breakpoint
CREATE UNIQUE INDEX "drop_logs_lab_member_unique" ON "drop_logs" USING btree ("lab_id","membership_id");--> statement-breakpoint
CREATE INDEX "drop_logs_member_idx" ON "drop_logs" USING btree ("membership_id");--> statement-breakpoint
CREATE INDEX "labs_course_idx" ON "labs" USING btree ("course_id");