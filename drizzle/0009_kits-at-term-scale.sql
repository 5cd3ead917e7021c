CREATE TYPE "public"."kit_problem_kind" AS ENUM('missing', 'damaged', 'incomplete');--> statement-breakpoint
CREATE TYPE "public"."kit_problem_status" AS ENUM('received', 'replacement_sent', 'resolved');--> statement-breakpoint
CREATE TYPE "public"."label_status" AS ENUM('queued', 'buying', 'bought', 'failed');--> statement-breakpoint
CREATE TYPE "public"."shipment_kind" AS ENUM('outbound', 'return', 'replacement');--> statement-breakpoint
CREATE TABLE "kit_problem_updates" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"problem_id" uuid NOT NULL,
	"actor_id" uuid,
	"from_status" "kit_problem_status",
	"to_status" "kit_problem_status" NOT NULL,
	"note" text,
	"detail" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "kit_problems" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"kit_id" uuid NOT NULL,
	"membership_id" uuid,
	"reported_by_id" uuid,
	"part_id" uuid,
	"kind" "kit_problem_kind" NOT NULL,
	"note" text NOT NULL,
	"status" "kit_problem_status" DEFAULT 'received' NOT NULL,
	"replacement_part_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "shipment_items" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shipment_id" uuid NOT NULL,
	"kit_id" uuid NOT NULL,
	"problem_id" uuid,
	"status" "label_status" DEFAULT 'queued' NOT NULL,
	"carrier_shipment_id" text,
	"carrier" text,
	"service" text,
	"tracking_number" text,
	"label_pdf" "bytea",
	"error_code" text,
	"error_message" text,
	"attempts" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "shipments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"kind" "shipment_kind" NOT NULL,
	"request_key" text NOT NULL,
	"created_by_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "shipping_addresses" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"membership_id" uuid,
	"invitation_id" uuid,
	"name" text NOT NULL,
	"line1" text NOT NULL,
	"line2" text,
	"city" text NOT NULL,
	"region" text,
	"postcode" text,
	"country" text NOT NULL,
	"phone" text,
	"updated_by_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "shipping_addresses_one_owner" CHECK (num_nonnulls("shipping_addresses"."membership_id", "shipping_addresses"."invitation_id") = 1)
);
--> statement-breakpoint
DROP INDEX "kits_holder_unique";--> statement-breakpoint
ALTER TABLE "courses" ADD COLUMN "return_address" jsonb;--> statement-breakpoint
ALTER TABLE "courses" ADD COLUMN "kit_return_by" date;--> statement-breakpoint
ALTER TABLE "courses" ADD COLUMN "kit_return_reminder_days" integer[] DEFAULT '{1,7}'::integer[] NOT NULL;--> statement-breakpoint
ALTER TABLE "kits" ADD COLUMN "holder_invitation_id" uuid;--> statement-breakpoint
ALTER TABLE "kits" ADD COLUMN "return_carrier" text;--> statement-breakpoint
ALTER TABLE "kits" ADD COLUMN "return_tracking_number" text;--> statement-breakpoint
ALTER TABLE "kits" ADD COLUMN "return_shipped_on" text;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "bottles_on_hand" integer;--> statement-breakpoint
ALTER TABLE "kit_problem_updates" ADD CONSTRAINT "kit_problem_updates_problem_id_kit_problems_id_fk" FOREIGN KEY ("problem_id") REFERENCES "public"."kit_problems"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_problem_updates" ADD CONSTRAINT "kit_problem_updates_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_problems" ADD CONSTRAINT "kit_problems_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_problems" ADD CONSTRAINT "kit_problems_kit_id_kits_id_fk" FOREIGN KEY ("kit_id") REFERENCES "public"."kits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_problems" ADD CONSTRAINT "kit_problems_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_problems" ADD CONSTRAINT "kit_problems_reported_by_id_users_id_fk" FOREIGN KEY ("reported_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_problems" ADD CONSTRAINT "kit_problems_part_id_parts_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."parts"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kit_problems" ADD CONSTRAINT "kit_problems_replacement_part_id_parts_id_fk" FOREIGN KEY ("replacement_part_id") REFERENCES "public"."parts"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipment_items" ADD CONSTRAINT "shipment_items_shipment_id_shipments_id_fk" FOREIGN KEY ("shipment_id") REFERENCES "public"."shipments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipment_items" ADD CONSTRAINT "shipment_items_kit_id_kits_id_fk" FOREIGN KEY ("kit_id") REFERENCES "public"."kits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipment_items" ADD CONSTRAINT "shipment_items_problem_id_kit_problems_id_fk" FOREIGN KEY ("problem_id") REFERENCES "public"."kit_problems"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipments" ADD CONSTRAINT "shipments_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipments" ADD CONSTRAINT "shipments_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipping_addresses" ADD CONSTRAINT "shipping_addresses_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipping_addresses" ADD CONSTRAINT "shipping_addresses_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipping_addresses" ADD CONSTRAINT "shipping_addresses_invitation_id_invitations_id_fk" FOREIGN KEY ("invitation_id") REFERENCES "public"."invitations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipping_addresses" ADD CONSTRAINT "shipping_addresses_updated_by_id_users_id_fk" FOREIGN KEY ("updated_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "kit_problem_updates_problem_created_idx" ON "kit_problem_updates" USING btree ("problem_id","created_at");--> statement-breakpoint
CREATE INDEX "kit_problems_course_status_idx" ON "kit_problems" USING btree ("course_id","status");--> statement-breakpoint
CREATE INDEX "kit_problems_kit_idx" ON "kit_problems" USING btree ("kit_id");--> statement-breakpoint
CREATE UNIQUE INDEX "shipment_items_shipment_kit_unique" ON "shipment_items" USING btree ("shipment_id","kit_id");--> statement-breakpoint
CREATE INDEX "shipment_items_kit_idx" ON "shipment_items" USING btree ("kit_id");--> statement-breakpoint
CREATE UNIQUE INDEX "shipments_course_request_key_unique" ON "shipments" USING btree ("course_id","request_key");--> statement-breakpoint
CREATE UNIQUE INDEX "shipping_addresses_membership_unique" ON "shipping_addresses" USING btree ("membership_id");--> statement-breakpoint
CREATE UNIQUE INDEX "shipping_addresses_invitation_unique" ON "shipping_addresses" USING btree ("invitation_id");--> statement-breakpoint
CREATE INDEX "shipping_addresses_course_idx" ON "shipping_addresses" USING btree ("course_id");--> statement-breakpoint
ALTER TABLE "kits" ADD CONSTRAINT "kits_holder_invitation_id_invitations_id_fk" FOREIGN KEY ("holder_invitation_id") REFERENCES "public"."invitations"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "kits_holder_invitation_unique" ON "kits" USING btree ("holder_invitation_id") WHERE "kits"."holder_invitation_id" is not null and "kits"."state" <> 'coming_back';--> statement-breakpoint
CREATE UNIQUE INDEX "kits_holder_unique" ON "kits" USING btree ("holder_membership_id") WHERE "kits"."holder_membership_id" is not null and "kits"."state" <> 'coming_back';--> statement-breakpoint
ALTER TABLE "kits" ADD CONSTRAINT "kits_one_holder" CHECK (num_nonnulls("kits"."holder_membership_id", "kits"."holder_invitation_id") <= 1);--> statement-breakpoint
-- Reports made before problems were followed up become problems: still open if the kit has not moved since.
INSERT INTO "kit_problems" ("course_id", "kit_id", "membership_id", "reported_by_id", "part_id", "kind", "note", "status", "created_at", "updated_at")
SELECT k."course_id", e."kit_id", m."id", e."actor_id", p."id",
  (e."detail"->>'problem')::"kit_problem_kind", coalesce(e."note", ''),
  CASE WHEN e."created_at" > k."updated_at" THEN 'received'::"kit_problem_status" ELSE 'resolved'::"kit_problem_status" END,
  e."created_at", e."created_at"
FROM "kit_events" e
JOIN "kits" k ON k."id" = e."kit_id"
LEFT JOIN "course_memberships" m ON m."course_id" = k."course_id" AND m."user_id" = e."actor_id"
LEFT JOIN "parts" p ON p."id" = (e."detail"->>'partId')::uuid
WHERE e."action" = 'reported';
