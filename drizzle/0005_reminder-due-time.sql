-- Reminders sent so far were for the lab's own due time (there were no extensions to remind of).
ALTER TABLE "lab_reminders" ADD COLUMN "due_at" timestamp with time zone;--> statement-breakpoint
UPDATE "lab_reminders" r SET "due_at" = l."due_at" FROM "labs" l WHERE l."id" = r."lab_id";--> statement-breakpoint
ALTER TABLE "lab_reminders" ALTER COLUMN "due_at" SET NOT NULL;--> statement-breakpoint
ALTER TABLE "lab_reminders" DROP CONSTRAINT "lab_reminders_lab_id_membership_id_offset_hours_pk";--> statement-breakpoint
ALTER TABLE "lab_reminders" ADD CONSTRAINT "lab_reminders_lab_id_membership_id_due_at_offset_hours_pk" PRIMARY KEY("lab_id","membership_id","due_at","offset_hours");
