CREATE TABLE "course_message_recipients" (
	"message_id" uuid NOT NULL,
	"membership_id" uuid NOT NULL,
	"outbox_id" uuid,
	CONSTRAINT "course_message_recipients_message_id_membership_id_pk" PRIMARY KEY("message_id","membership_id")
);
--> statement-breakpoint
CREATE TABLE "course_messages" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"course_id" uuid NOT NULL,
	"author_id" uuid,
	"subject" text NOT NULL,
	"body" text NOT NULL,
	"audience" jsonb NOT NULL,
	"audience_label" text NOT NULL,
	"recipient_count" integer NOT NULL,
	"send_key" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "users" ADD COLUMN "calendar_feed_token_hash" text;--> statement-breakpoint
ALTER TABLE "courses" ADD COLUMN "mark_book_drop_lowest" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "courses" ADD COLUMN "carried_from_id" uuid;--> statement-breakpoint
ALTER TABLE "courses" ADD COLUMN "archived_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "courses" ADD COLUMN "archived_by_id" uuid;--> statement-breakpoint
ALTER TABLE "invitations" ADD COLUMN "student_number" text;--> statement-breakpoint
ALTER TABLE "invitations" ADD COLUMN "revoked_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "invitations" ADD COLUMN "revoked_by_id" uuid;--> statement-breakpoint
ALTER TABLE "invitations" ADD COLUMN "replaced_by_id" uuid;--> statement-breakpoint
ALTER TABLE "labs" ADD COLUMN "mark_weight" double precision DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "course_message_recipients" ADD CONSTRAINT "course_message_recipients_message_id_course_messages_id_fk" FOREIGN KEY ("message_id") REFERENCES "public"."course_messages"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "course_message_recipients" ADD CONSTRAINT "course_message_recipients_membership_id_course_memberships_id_fk" FOREIGN KEY ("membership_id") REFERENCES "public"."course_memberships"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "course_messages" ADD CONSTRAINT "course_messages_course_id_courses_id_fk" FOREIGN KEY ("course_id") REFERENCES "public"."courses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "course_messages" ADD CONSTRAINT "course_messages_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "course_message_recipients_membership_idx" ON "course_message_recipients" USING btree ("membership_id");--> statement-breakpoint
CREATE UNIQUE INDEX "course_messages_course_send_key_unique" ON "course_messages" USING btree ("course_id","send_key");--> statement-breakpoint
CREATE INDEX "course_messages_course_created_idx" ON "course_messages" USING btree ("course_id","created_at");--> statement-breakpoint
ALTER TABLE "courses" ADD CONSTRAINT "courses_carried_from_id_courses_id_fk" FOREIGN KEY ("carried_from_id") REFERENCES "public"."courses"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "courses" ADD CONSTRAINT "courses_archived_by_id_users_id_fk" FOREIGN KEY ("archived_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_revoked_by_id_users_id_fk" FOREIGN KEY ("revoked_by_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_replaced_by_id_invitations_id_fk" FOREIGN KEY ("replaced_by_id") REFERENCES "public"."invitations"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "users_calendar_feed_token_unique" ON "users" USING btree ("calendar_feed_token_hash");--> statement-breakpoint
ALTER TABLE "courses" ADD CONSTRAINT "courses_drop_lowest_not_negative" CHECK ("courses"."mark_book_drop_lowest" >= 0);--> statement-breakpoint
ALTER TABLE "labs" ADD CONSTRAINT "labs_mark_weight_not_negative" CHECK ("labs"."mark_weight" >= 0);