CREATE TYPE "public"."kit_state" AS ENUM('on_shelf', 'packed', 'in_transit', 'at_home', 'coming_back', 'checked_in', 'retired');--> statement-breakpoint
CREATE TYPE "public"."part_kind" AS ENUM('sphere', 'fluid_lot', 'column', 'accessory');--> statement-breakpoint
CREATE TYPE "public"."part_status" AS ENUM('in_service', 'remeasure', 'retired');--> statement-breakpoint
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
ALTER TABLE "kit_events" ADD CONSTRAINT "kit_events_kit_id_kits_id_fk" FOREIGN KEY ("kit_id") REFERENCES "public"."kits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_events" ADD CONSTRAINT "kit_events_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_parts" ADD CONSTRAINT "kit_parts_kit_id_kits_id_fk" FOREIGN KEY ("kit_id") REFERENCES "public"."kits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_parts" ADD CONSTRAINT "kit_parts_part_id_parts_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."parts"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kits" ADD CONSTRAINT "kits_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kits" ADD CONSTRAINT "kits_holder_membership_id_course_memberships_id_fk" FOREIGN KEY ("holder_membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "part_events" ADD CONSTRAINT "part_events_part_id_parts_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."parts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "part_events" ADD CONSTRAINT "part_events_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "parts" ADD CONSTRAINT "parts_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "kit_events_kit_created_idx" ON "kit_events" USING btree ("kit_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "kit_parts_part_unique" ON "kit_parts" USING btree ("part_id");--> statement-breakpoint
CREATE UNIQUE INDEX "kits_course_number_unique" ON "kits" USING btree ("course_id","number");--> statement-breakpoint
CREATE UNIQUE INDEX "kits_holder_unique" ON "kits" USING btree ("holder_membership_id") WHERE "kits"."holder_membership_id" is not null;--> statement-breakpoint
CREATE INDEX "kits_course_state_idx" ON "kits" USING btree ("course_id","state");--> statement-breakpoint
CREATE INDEX "part_events_part_created_idx" ON "part_events" USING btree ("part_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "parts_course_label_unique" ON "parts" USING btree ("course_id","label");--> statement-breakpoint
CREATE INDEX "parts_course_kind_idx" ON "parts" USING btree ("course_id","kind");