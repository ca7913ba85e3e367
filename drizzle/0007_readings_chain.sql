ALTER TABLE "readings" ADD COLUMN "run_seq" integer;--> statement-breakpoint
ALTER TABLE "readings" ADD COLUMN "prev_hash" text;--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "reading_count" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "last_reading_hash" text;--> statement-breakpoint
CREATE UNIQUE INDEX "readings_run_seq" ON "readings" USING btree ("run_id","run_seq");