ALTER TABLE "parts" ADD COLUMN "density_uncertainty_kg_m3" real;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "density_temperature_coefficient_kg_m3_k" real;--> statement-breakpoint
ALTER TABLE "parts" ADD COLUMN "inner_diameter_uncertainty_mm" real;