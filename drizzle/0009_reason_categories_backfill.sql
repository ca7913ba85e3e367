-- Existing withdrawals, reassignments and deviations get a reason category; existing
-- seeds were typed. The guards that freeze closed studies' runs and keep bench events
-- append-only are lifted for this one backfill and put back at once.
ALTER TABLE runs DISABLE TRIGGER runs_frozen_when_closed;
--> statement-breakpoint
ALTER TABLE run_events DISABLE TRIGGER run_events_append_only;
--> statement-breakpoint
UPDATE runs SET withdrawn_category = 'other' WHERE state = 'withdrawn' AND withdrawn_category IS NULL;
--> statement-breakpoint
UPDATE run_events SET category = CASE kind
    WHEN 'withdrawn' THEN 'other'::reason_category
    WHEN 'reassigned' THEN 'tester_unavailable'::reason_category
    WHEN 'deviation' THEN 'protocol_deviation'::reason_category
  END
  WHERE kind IN ('withdrawn', 'reassigned', 'deviation') AND category IS NULL;
--> statement-breakpoint
ALTER TABLE run_events ENABLE TRIGGER run_events_append_only;
--> statement-breakpoint
ALTER TABLE runs ENABLE TRIGGER runs_frozen_when_closed;
--> statement-breakpoint
UPDATE studies SET seed_source = 'typed' WHERE seed IS NOT NULL AND seed_source IS NULL;
--> statement-breakpoint
ALTER TABLE runs ADD CONSTRAINT "runs_withdrawn_category" CHECK ("runs"."state" <> 'withdrawn' OR "runs"."withdrawn_category" IS NOT NULL);
