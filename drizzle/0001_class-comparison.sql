CREATE TYPE "public"."comparison_label" AS ENUM('consistent', 'suspect', 'outlier');--> statement-breakpoint
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
ALTER TABLE "courses" ADD COLUMN "part_bias_alpha" real DEFAULT 0.05 NOT NULL;--> statement-breakpoint
ALTER TABLE "comparison_label_changes" ADD CONSTRAINT "comparison_label_changes_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "comparison_label_changes" ADD CONSTRAINT "comparison_label_changes_version_id_drop_log_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."drop_log_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "comparison_labels" ADD CONSTRAINT "comparison_labels_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "comparison_labels" ADD CONSTRAINT "comparison_labels_version_id_drop_log_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."drop_log_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "comparison_label_changes_log_idx" ON "comparison_label_changes" USING btree ("drop_log_id","changed_at");--> statement-breakpoint
CREATE INDEX "comparison_label_changes_lab_idx" ON "comparison_label_changes" USING btree ("lab_id");--> statement-breakpoint
CREATE INDEX "comparison_labels_lab_idx" ON "comparison_labels" USING btree ("lab_id");