CREATE TYPE "public"."email_status" AS ENUM('queued', 'sent', 'failed');--> statement-breakpoint
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
ALTER TABLE "kits" ADD COLUMN "fluid_lot_id" uuid;--> statement-breakpoint
ALTER TABLE "email_outbox" ADD CONSTRAINT "email_outbox_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "caught_emails_received_idx" ON "caught_emails" USING btree ("received_at");--> statement-breakpoint
CREATE INDEX "caught_emails_to_idx" ON "caught_emails" USING gin ("to_addresses");--> statement-breakpoint
CREATE UNIQUE INDEX "email_outbox_dedupe_key_unique" ON "email_outbox" USING btree ("dedupe_key");--> statement-breakpoint
CREATE INDEX "email_outbox_course_status_idx" ON "email_outbox" USING btree ("course_id","status");--> statement-breakpoint
ALTER TABLE "kits" ADD CONSTRAINT "kits_fluid_lot_id_parts_id_fk" FOREIGN KEY ("fluid_lot_id") REFERENCES "public"."parts"("id") ON DELETE restrict ON UPDATE no action;