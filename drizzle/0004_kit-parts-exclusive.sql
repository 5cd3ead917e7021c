ALTER TABLE "kits" DROP CONSTRAINT "kits_fluid_lot_id_parts_id_fk";
--> statement-breakpoint
DROP INDEX "kit_parts_part_unique";--> statement-breakpoint
ALTER TABLE "kit_parts" ADD COLUMN "exclusive" boolean DEFAULT true NOT NULL;--> statement-breakpoint
CREATE UNIQUE INDEX "kit_parts_exclusive_part_unique" ON "kit_parts" USING btree ("part_id") WHERE "kit_parts"."exclusive";--> statement-breakpoint
CREATE INDEX "kit_parts_part_idx" ON "kit_parts" USING btree ("part_id");--> statement-breakpoint
ALTER TABLE "kits" DROP COLUMN "fluid_lot_id";