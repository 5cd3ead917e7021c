CREATE TYPE "public"."comparison_label" AS ENUM('consistent', 'suspect', 'outlier');--> statement-breakpoint
CREATE TYPE "public"."course_role" AS ENUM('instructor', 'ta', 'student');--> statement-breakpoint
CREATE TYPE "public"."email_link_purpose" AS ENUM('sign_in', 'password_reset');--> statement-breakpoint
CREATE TYPE "public"."email_status" AS ENUM('queued', 'sent', 'failed');--> statement-breakpoint
CREATE TYPE "public"."experiment_kind" AS ENUM('drag', 'viscometry');--> statement-breakpoint
CREATE TYPE "public"."kit_state" AS ENUM('on_shelf', 'packed', 'in_transit', 'at_home', 'coming_back', 'checked_in', 'retired');--> statement-breakpoint
CREATE TYPE "public"."lab_status" AS ENUM('draft', 'published', 'closed');--> statement-breakpoint
CREATE TYPE "public"."part_kind" AS ENUM('sphere', 'fluid_lot', 'column', 'accessory');--> statement-breakpoint
CREATE TYPE "public"."part_status" AS ENUM('in_service', 'remeasure', 'retired');--> statement-breakpoint
CREATE TABLE "api_tokens" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" uuid NOT NULL,
	"name" text NOT NULL,
	"token_hash" text NOT NULL,
	"last_used_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "audit_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid,
	"actor_id" uuid,
	"action" text NOT NULL,
	"subject" text,
	"ip" "inet",
	"detail" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"viewed_as" boolean DEFAULT false NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "caught_emails" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"message_id" text,
	"from_address" text NOT NULL,
	"to_addresses" text[] NOT NULL,
	"subject" text NOT NULL,
	"html" text,
	"text" text,
	"headers" jsonb NOT NULL,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "cohorts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"name" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "comparison_label_changes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"drop_log_id" uuid NOT NULL,
	"version_id" uuid NOT NULL,
	"from_label" "comparison_label",
	"to_label" "comparison_label" NOT NULL,
	"reason" text NOT NULL,
	"method" jsonb NOT NULL,
	"changed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "comparison_labels" (
	"drop_log_id" uuid PRIMARY KEY NOT NULL,
	"lab_id" uuid NOT NULL,
	"version_id" uuid NOT NULL,
	"figure" real NOT NULL,
	"label" "comparison_label" NOT NULL,
	"reason" text NOT NULL,
	"method" jsonb NOT NULL,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "course_memberships" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"role" "course_role" NOT NULL,
	"cohort_id" uuid,
	"removed_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "courses" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"title" text NOT NULL,
	"code" text NOT NULL,
	"term" text NOT NULL,
	"time_zone" text NOT NULL,
	"local_gravity" real,
	"part_bias_alpha" real DEFAULT 0.05 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
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
CREATE TABLE "email_links" (
	"id" text PRIMARY KEY NOT NULL,
	"user_id" uuid NOT NULL,
	"purpose" "email_link_purpose" NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "email_outbox" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"to_address" text NOT NULL,
	"to_name" text,
	"template" text NOT NULL,
	"props" jsonb NOT NULL,
	"subject" text NOT NULL,
	"course_id" uuid,
	"dedupe_key" text,
	"status" "email_status" DEFAULT 'queued' NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"last_error" text,
	"transport" text,
	"provider_message_id" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"sent_at" timestamp with time zone,
	"failed_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "invitations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"email" text NOT NULL,
	"name" text,
	"role" "course_role" NOT NULL,
	"cohort_id" uuid,
	"invited_by_id" uuid,
	"token_hash" text NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"accepted_at" timestamp with time zone,
	"accepted_by_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "kit_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"kit_id" uuid NOT NULL,
	"actor_id" uuid,
	"from_state" "kit_state",
	"to_state" "kit_state",
	"action" text NOT NULL,
	"note" text,
	"detail" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "kit_parts" (
	"kit_id" uuid NOT NULL,
	"part_id" uuid NOT NULL,
	"exclusive" boolean DEFAULT true NOT NULL,
	CONSTRAINT "kit_parts_kit_id_part_id_pk" PRIMARY KEY("kit_id","part_id")
);
--> statement-breakpoint
CREATE TABLE "kits" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"number" text NOT NULL,
	"state" "kit_state" DEFAULT 'on_shelf' NOT NULL,
	"holder_membership_id" uuid,
	"carrier" text,
	"tracking_number" text,
	"shipped_on" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
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
CREATE TABLE "part_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"part_id" uuid NOT NULL,
	"actor_id" uuid,
	"action" text NOT NULL,
	"note" text,
	"detail" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "parts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"kind" "part_kind" NOT NULL,
	"label" text NOT NULL,
	"status" "part_status" DEFAULT 'in_service' NOT NULL,
	"notes" text,
	"material" text,
	"diameter_mm" real,
	"diameter_resolution_mm" real,
	"mass_g" real,
	"mass_resolution_g" real,
	"fluid_name" text,
	"density_kg_m3" real,
	"calibration" jsonb,
	"inner_diameter_mm" real,
	"timed_distance_mm" real,
	"run_in_mm" real,
	"margin_below_mm" real,
	"accessory_type" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "rate_limits" (
	"key" varchar(255) PRIMARY KEY NOT NULL,
	"points" integer DEFAULT 0 NOT NULL,
	"expire" bigint
);
--> statement-breakpoint
CREATE TABLE "sessions" (
	"id" text PRIMARY KEY NOT NULL,
	"user_id" uuid NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"user_agent" text,
	"ip" "inet",
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "ta_cohort_assignments" (
	"membership_id" uuid NOT NULL,
	"cohort_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "ta_cohort_assignments_membership_id_cohort_id_pk" PRIMARY KEY("membership_id","cohort_id")
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" text NOT NULL,
	"name" text NOT NULL,
	"password_hash" text,
	"student_number" text,
	"may_create_courses" boolean DEFAULT false NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "api_tokens" ADD CONSTRAINT "api_tokens_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_events" ADD CONSTRAINT "audit_events_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_events" ADD CONSTRAINT "audit_events_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "cohorts" ADD CONSTRAINT "cohorts_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "comparison_label_changes" ADD CONSTRAINT "comparison_label_changes_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "comparison_label_changes" ADD CONSTRAINT "comparison_label_changes_version_id_drop_log_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."drop_log_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "comparison_labels" ADD CONSTRAINT "comparison_labels_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "comparison_labels" ADD CONSTRAINT "comparison_labels_version_id_drop_log_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."drop_log_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "course_memberships" ADD CONSTRAINT "course_memberships_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "course_memberships" ADD CONSTRAINT "course_memberships_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "course_memberships" ADD CONSTRAINT "course_memberships_cohort_id_cohorts_id_fk" FOREIGN KEY ("cohort_id") REFERENCES "public"."cohorts"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_photos" ADD CONSTRAINT "drop_log_photos_drop_log_id_drop_logs_id_fk" FOREIGN KEY ("drop_log_id") REFERENCES "public"."drop_logs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_photos" ADD CONSTRAINT "drop_log_photos_version_id_drop_log_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."drop_log_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD CONSTRAINT "drop_log_versions_drop_log_id_drop_logs_id_fk" FOREIGN KEY ("drop_log_id") REFERENCES "public"."drop_logs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD CONSTRAINT "drop_log_versions_submitted_by_id_users_id_fk" FOREIGN KEY ("submitted_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD CONSTRAINT "drop_log_versions_sphere_id_parts_id_fk" FOREIGN KEY ("sphere_id") REFERENCES "public"."parts"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD CONSTRAINT "drop_log_versions_fluid_lot_id_parts_id_fk" FOREIGN KEY ("fluid_lot_id") REFERENCES "public"."parts"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD CONSTRAINT "drop_log_versions_column_id_parts_id_fk" FOREIGN KEY ("column_id") REFERENCES "public"."parts"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_logs" ADD CONSTRAINT "drop_logs_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drop_logs" ADD CONSTRAINT "drop_logs_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "email_links" ADD CONSTRAINT "email_links_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "email_outbox" ADD CONSTRAINT "email_outbox_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_cohort_id_cohorts_id_fk" FOREIGN KEY ("cohort_id") REFERENCES "public"."cohorts"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_invited_by_id_users_id_fk" FOREIGN KEY ("invited_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_accepted_by_id_users_id_fk" FOREIGN KEY ("accepted_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_events" ADD CONSTRAINT "kit_events_kit_id_kits_id_fk" FOREIGN KEY ("kit_id") REFERENCES "public"."kits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_events" ADD CONSTRAINT "kit_events_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_parts" ADD CONSTRAINT "kit_parts_kit_id_kits_id_fk" FOREIGN KEY ("kit_id") REFERENCES "public"."kits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_parts" ADD CONSTRAINT "kit_parts_part_id_parts_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."parts"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kits" ADD CONSTRAINT "kits_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kits" ADD CONSTRAINT "kits_holder_membership_id_course_memberships_id_fk" FOREIGN KEY ("holder_membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_cohorts" ADD CONSTRAINT "lab_cohorts_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_cohorts" ADD CONSTRAINT "lab_cohorts_cohort_id_cohorts_id_fk" FOREIGN KEY ("cohort_id") REFERENCES "public"."cohorts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_reminders" ADD CONSTRAINT "lab_reminders_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_reminders" ADD CONSTRAINT "lab_reminders_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "labs" ADD CONSTRAINT "labs_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "part_events" ADD CONSTRAINT "part_events_part_id_parts_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."parts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "part_events" ADD CONSTRAINT "part_events_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "parts" ADD CONSTRAINT "parts_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sessions" ADD CONSTRAINT "sessions_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ta_cohort_assignments" ADD CONSTRAINT "ta_cohort_assignments_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ta_cohort_assignments" ADD CONSTRAINT "ta_cohort_assignments_cohort_id_cohorts_id_fk" FOREIGN KEY ("cohort_id") REFERENCES "public"."cohorts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "api_tokens_token_hash_unique" ON "api_tokens" USING btree ("token_hash");--> statement-breakpoint
CREATE INDEX "api_tokens_user_idx" ON "api_tokens" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "audit_events_course_created_idx" ON "audit_events" USING btree ("course_id","created_at");--> statement-breakpoint
CREATE INDEX "audit_events_actor_idx" ON "audit_events" USING btree ("actor_id");--> statement-breakpoint
CREATE INDEX "caught_emails_received_idx" ON "caught_emails" USING btree ("received_at");--> statement-breakpoint
CREATE INDEX "caught_emails_to_idx" ON "caught_emails" USING gin ("to_addresses");--> statement-breakpoint
CREATE UNIQUE INDEX "cohorts_course_name_unique" ON "cohorts" USING btree ("course_id","name");--> statement-breakpoint
CREATE INDEX "comparison_label_changes_log_idx" ON "comparison_label_changes" USING btree ("drop_log_id","changed_at");--> statement-breakpoint
CREATE INDEX "comparison_label_changes_lab_idx" ON "comparison_label_changes" USING btree ("lab_id");--> statement-breakpoint
CREATE INDEX "comparison_labels_lab_idx" ON "comparison_labels" USING btree ("lab_id");--> statement-breakpoint
CREATE UNIQUE INDEX "course_memberships_course_user_unique" ON "course_memberships" USING btree ("course_id","user_id");--> statement-breakpoint
CREATE INDEX "course_memberships_user_idx" ON "course_memberships" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "course_memberships_cohort_idx" ON "course_memberships" USING btree ("cohort_id");--> statement-breakpoint
CREATE UNIQUE INDEX "courses_code_term_unique" ON "courses" USING btree ("code","term");--> statement-breakpoint
CREATE INDEX "drop_log_photos_log_idx" ON "drop_log_photos" USING btree ("drop_log_id");--> statement-breakpoint
CREATE UNIQUE INDEX "drop_log_versions_log_version_unique" ON "drop_log_versions" USING btree ("drop_log_id","version");--> statement-breakpoint
CREATE UNIQUE INDEX "drop_log_versions_log_key_unique" ON "drop_log_versions" USING btree ("drop_log_id","idempotency_key");--> statement-breakpoint
CREATE INDEX "drop_log_versions_sphere_idx" ON "drop_log_versions" USING btree ("sphere_id");--> statement-breakpoint
CREATE UNIQUE INDEX "drop_logs_lab_member_unique" ON "drop_logs" USING btree ("lab_id","membership_id");--> statement-breakpoint
CREATE INDEX "drop_logs_member_idx" ON "drop_logs" USING btree ("membership_id");--> statement-breakpoint
CREATE INDEX "email_links_user_idx" ON "email_links" USING btree ("user_id");--> statement-breakpoint
CREATE UNIQUE INDEX "email_outbox_dedupe_key_unique" ON "email_outbox" USING btree ("dedupe_key");--> statement-breakpoint
CREATE INDEX "email_outbox_course_status_idx" ON "email_outbox" USING btree ("course_id","status");--> statement-breakpoint
CREATE UNIQUE INDEX "invitations_token_hash_unique" ON "invitations" USING btree ("token_hash");--> statement-breakpoint
CREATE INDEX "invitations_course_email_idx" ON "invitations" USING btree ("course_id","email");--> statement-breakpoint
CREATE INDEX "kit_events_kit_created_idx" ON "kit_events" USING btree ("kit_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "kit_parts_exclusive_part_unique" ON "kit_parts" USING btree ("part_id") WHERE "kit_parts"."exclusive";--> statement-breakpoint
CREATE INDEX "kit_parts_part_idx" ON "kit_parts" USING btree ("part_id");--> statement-breakpoint
CREATE UNIQUE INDEX "kits_course_number_unique" ON "kits" USING btree ("course_id","number");--> statement-breakpoint
CREATE UNIQUE INDEX "kits_holder_unique" ON "kits" USING btree ("holder_membership_id") WHERE "kits"."holder_membership_id" is not null;--> statement-breakpoint
CREATE INDEX "kits_course_state_idx" ON "kits" USING btree ("course_id","state");--> statement-breakpoint
CREATE INDEX "labs_course_idx" ON "labs" USING btree ("course_id");--> statement-breakpoint
CREATE INDEX "part_events_part_created_idx" ON "part_events" USING btree ("part_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "parts_course_label_unique" ON "parts" USING btree ("course_id","label");--> statement-breakpoint
CREATE INDEX "parts_course_kind_idx" ON "parts" USING btree ("course_id","kind");--> statement-breakpoint
CREATE INDEX "sessions_user_idx" ON "sessions" USING btree ("user_id");--> statement-breakpoint
CREATE UNIQUE INDEX "users_email_unique" ON "users" USING btree ("email");