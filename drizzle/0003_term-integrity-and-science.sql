CREATE TYPE "public"."after_release_hand_ins" AS ENUM('refuse', 'reopen');--> statement-breakpoint
ALTER TABLE "labs" ADD COLUMN "after_release_hand_ins" "after_release_hand_ins" DEFAULT 'refuse' NOT NULL;--> statement-breakpoint
ALTER TABLE "marks" ADD COLUMN "reopened_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "density_uncertainty_kg_m3" real;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "density_temperature_coefficient_kg_m3_k" real;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "inner_diameter_uncertainty_mm" real;