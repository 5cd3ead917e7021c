ALTER TABLE "drop_log_versions" ADD COLUMN "temperature_c" double precision;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD COLUMN "gravity" double precision;--> statement-breakpoint
ALTER TABLE "drop_log_versions" ADD COLUMN "reduction_mode" text;--> statement-breakpoint
-- Hand-ins stored before these columns get the values the pages read out of their JSON until now.
UPDATE "drop_log_versions" SET
  "temperature_c" = CASE WHEN jsonb_typeof("input" -> 'temperatureC') = 'number' THEN ("input" ->> 'temperatureC')::double precision END,
  "gravity" = CASE WHEN jsonb_typeof("kit_records" -> 'gravity') = 'number' THEN ("kit_records" ->> 'gravity')::double precision END,
  "reduction_mode" = "reduction" ->> 'mode';
