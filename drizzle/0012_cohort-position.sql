ALTER TABLE "cohorts" ADD COLUMN "position" integer DEFAULT 0 NOT NULL;
--> statement-breakpoint
-- Existing cohorts keep the order they were shown in (by name), numbered per course from 0.
UPDATE "cohorts" SET "position" = ranked.position FROM (SELECT "id", (row_number() OVER (PARTITION BY "course_id" ORDER BY "name") - 1)::int AS position FROM "cohorts") AS ranked WHERE "cohorts"."id" = ranked."id";
