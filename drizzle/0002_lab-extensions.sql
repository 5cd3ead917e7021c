CREATE TABLE "lab_extensions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"membership_id" uuid,
	"cohort_id" uuid,
	"due_at" timestamp with time zone NOT NULL,
	"late_cutoff_at" timestamp with time zone,
	"reason" text NOT NULL,
	"created_by_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "lab_extensions_one_target" CHECK (("lab_extensions"."membership_id" is null) <> ("lab_extensions"."cohort_id" is null)),
	CONSTRAINT "lab_extensions_cutoff_after_due" CHECK ("lab_extensions"."late_cutoff_at" is null or "lab_extensions"."late_cutoff_at" >= "lab_extensions"."due_at")
);
--> statement-breakpoint
ALTER TABLE "lab_extensions" ADD CONSTRAINT "lab_extensions_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_extensions" ADD CONSTRAINT "lab_extensions_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_extensions" ADD CONSTRAINT "lab_extensions_cohort_id_cohorts_id_fk" FOREIGN KEY ("cohort_id") REFERENCES "public"."cohorts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_extensions" ADD CONSTRAINT "lab_extensions_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "lab_extensions_lab_member_unique" ON "lab_extensions" USING btree ("lab_id","membership_id") WHERE "lab_extensions"."membership_id" is not null;--> statement-breakpoint
CREATE UNIQUE INDEX "lab_extensions_lab_cohort_unique" ON "lab_extensions" USING btree ("lab_id","cohort_id") WHERE "lab_extensions"."cohort_id" is not null;