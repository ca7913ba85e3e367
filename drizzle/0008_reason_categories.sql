CREATE TYPE "public"."reason_category" AS ENUM('blade_damaged', 'medium_fault', 'instrument_fault', 'tester_unavailable', 'protocol_deviation', 'other');--> statement-breakpoint
CREATE TYPE "public"."seed_source" AS ENUM('server', 'typed');--> statement-breakpoint
ALTER TABLE "randomization_rolls" ADD COLUMN "seed_source" "seed_source" DEFAULT 'typed' NOT NULL;--> statement-breakpoint
ALTER TABLE "run_events" ADD COLUMN "category" "reason_category";--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "withdrawn_category" "reason_category";--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "withdrawn_from_state" "run_state";--> statement-breakpoint
ALTER TABLE "studies" ADD COLUMN "seed_source" "seed_source";
-- The check that a withdrawn run has a category comes in the next migration, after the backfill.
