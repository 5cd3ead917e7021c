CREATE TYPE "public"."auto_rule" AS ENUM('required_drops', 'within_reference', 'not_outlier', 'on_time');--> statement-breakpoint
CREATE TYPE "public"."criterion_kind" AS ENUM('levels', 'range', 'auto');--> statement-breakpoint
CREATE TYPE "public"."mark_change_source" AS ENUM('desk', 'bulk', 'moderation');--> statement-breakpoint
CREATE TABLE "lab_marking" (
	"lab_id" uuid PRIMARY KEY NOT NULL,
	"ready_at" timestamp with time zone,
	"ready_by_id" uuid,
	"released_at" timestamp with time zone,
	"released_by_id" uuid,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "mark_changes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"mark_id" uuid NOT NULL,
	"lab_id" uuid NOT NULL,
	"membership_id" uuid NOT NULL,
	"changed_by_id" uuid,
	"changed_at" timestamp with time zone DEFAULT now() NOT NULL,
	"old" jsonb,
	"new" jsonb NOT NULL,
	"reason" text,
	"source" "mark_change_source" NOT NULL,
	"after_release" boolean DEFAULT false NOT NULL
);
--> statement-breakpoint
CREATE TABLE "marks" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"membership_id" uuid NOT NULL,
	"drop_log_version_id" uuid,
	"scores" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"feedback" text DEFAULT '' NOT NULL,
	"late_penalty_points" double precision DEFAULT 0 NOT NULL,
	"total" double precision DEFAULT 0 NOT NULL,
	"version" integer DEFAULT 1 NOT NULL,
	"marked_by_id" uuid,
	"moderated_by_id" uuid,
	"moderated_at" timestamp with time zone,
	"released_at" timestamp with time zone,
	"released_snapshot" jsonb,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "rubric_criteria" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"position" integer NOT NULL,
	"title" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"kind" "criterion_kind" NOT NULL,
	"levels" jsonb,
	"min_points" double precision DEFAULT 0 NOT NULL,
	"max_points" double precision NOT NULL,
	"auto_rule" "auto_rule",
	"auto_params" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "rubric_criteria_levels_only_for_levels" CHECK (("rubric_criteria"."kind" = 'levels') = ("rubric_criteria"."levels" is not null)),
	CONSTRAINT "rubric_criteria_rule_only_for_auto" CHECK (("rubric_criteria"."kind" = 'auto') = ("rubric_criteria"."auto_rule" is not null)),
	CONSTRAINT "rubric_criteria_points_in_order" CHECK ("rubric_criteria"."min_points" >= 0 and "rubric_criteria"."max_points" >= "rubric_criteria"."min_points")
);
--> statement-breakpoint
ALTER TABLE "lab_marking" ADD CONSTRAINT "lab_marking_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_marking" ADD CONSTRAINT "lab_marking_ready_by_id_users_id_fk" FOREIGN KEY ("ready_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_marking" ADD CONSTRAINT "lab_marking_released_by_id_users_id_fk" FOREIGN KEY ("released_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mark_changes" ADD CONSTRAINT "mark_changes_mark_id_marks_id_fk" FOREIGN KEY ("mark_id") REFERENCES "public"."marks"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mark_changes" ADD CONSTRAINT "mark_changes_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mark_changes" ADD CONSTRAINT "mark_changes_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mark_changes" ADD CONSTRAINT "mark_changes_changed_by_id_users_id_fk" FOREIGN KEY ("changed_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "marks" ADD CONSTRAINT "marks_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "marks" ADD CONSTRAINT "marks_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "marks" ADD CONSTRAINT "marks_drop_log_version_id_drop_log_versions_id_fk" FOREIGN KEY ("drop_log_version_id") REFERENCES "public"."drop_log_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "marks" ADD CONSTRAINT "marks_marked_by_id_users_id_fk" FOREIGN KEY ("marked_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "marks" ADD CONSTRAINT "marks_moderated_by_id_users_id_fk" FOREIGN KEY ("moderated_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "rubric_criteria" ADD CONSTRAINT "rubric_criteria_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "mark_changes_mark_changed_idx" ON "mark_changes" USING btree ("mark_id","changed_at");--> statement-breakpoint
CREATE INDEX "mark_changes_lab_changed_idx" ON "mark_changes" USING btree ("lab_id","changed_at");--> statement-breakpoint
CREATE UNIQUE INDEX "marks_lab_membership_unique" ON "marks" USING btree ("lab_id","membership_id");--> statement-breakpoint
CREATE INDEX "marks_membership_idx" ON "marks" USING btree ("membership_id");--> statement-breakpoint
CREATE INDEX "marks_marked_by_idx" ON "marks" USING btree ("marked_by_id");--> statement-breakpoint
CREATE INDEX "rubric_criteria_lab_position_idx" ON "rubric_criteria" USING btree ("lab_id","position");