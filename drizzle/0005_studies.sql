CREATE TYPE "public"."reading_kind" AS ENUM('check', 'confirmation');--> statement-breakpoint
CREATE TYPE "public"."run_event_kind" AS ENUM('chip', 'rolled_edge', 'media_change', 'other', 'deviation', 'failed_sharpening', 'handed_over', 'reassigned', 'withdrawn');--> statement-breakpoint
CREATE TYPE "public"."run_state" AS ENUM('waiting', 'in_progress', 'ended_threshold', 'censored', 'withdrawn');--> statement-breakpoint
CREATE TYPE "public"."study_design" AS ENUM('parallel', 'within_blade');--> statement-breakpoint
CREATE TYPE "public"."study_state" AS ENUM('draft', 'randomized', 'running', 'closed', 'unblinded');--> statement-breakpoint
CREATE TABLE "randomization_rolls" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"lab_id" uuid NOT NULL,
	"seed" text NOT NULL,
	"algorithm_version" integer NOT NULL,
	"schedule_hash" text NOT NULL,
	"design_hash" text NOT NULL,
	"rolled_by" uuid,
	"rolled_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "readings" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"run_id" uuid NOT NULL,
	"attempt" integer NOT NULL,
	"cut" integer NOT NULL,
	"position" text NOT NULL,
	"kind" "reading_kind" DEFAULT 'check' NOT NULL,
	"value" double precision NOT NULL,
	"supersedes_id" uuid,
	"reason" text,
	"idempotency_key" text NOT NULL,
	"content_hash" text NOT NULL,
	"entered_by" uuid NOT NULL,
	"entered_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "readings_correction_reason" CHECK ("readings"."supersedes_id" IS NULL OR "readings"."reason" IS NOT NULL),
	CONSTRAINT "readings_cut_nonnegative" CHECK ("readings"."cut" >= 0)
);
--> statement-breakpoint
CREATE TABLE "run_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"run_id" uuid NOT NULL,
	"attempt" integer DEFAULT 1 NOT NULL,
	"cut" integer,
	"kind" "run_event_kind" NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"photo_file_id" uuid,
	"idempotency_key" text,
	"entered_by" uuid,
	"entered_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "runs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"study_id" uuid NOT NULL,
	"study_blade_id" uuid NOT NULL,
	"arm_id" uuid NOT NULL,
	"replicate" integer NOT NULL,
	"blade_run_number" integer NOT NULL,
	"schedule_position" integer NOT NULL,
	"sitting" integer NOT NULL,
	"tester_id" uuid NOT NULL,
	"state" "run_state" DEFAULT 'waiting' NOT NULL,
	"attempt" integer DEFAULT 1 NOT NULL,
	"media_lot_id" uuid,
	"instrument_id" uuid,
	"instrument_flagged" boolean,
	"room_temp_c" double precision,
	"humidity_pct" double precision,
	"checklist" jsonb,
	"end_cut" double precision,
	"withdrawn_reason" text,
	"started_at" timestamp with time zone,
	"ended_at" timestamp with time zone,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "runs_withdrawn_reason" CHECK ("runs"."state" <> 'withdrawn' OR "runs"."withdrawn_reason" IS NOT NULL)
);
--> statement-breakpoint
CREATE TABLE "studies" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"short_name" text NOT NULL,
	"question" text DEFAULT '' NOT NULL,
	"hypothesis" text DEFAULT '' NOT NULL,
	"primary_outcome" text DEFAULT 'cuts_to_threshold' NOT NULL,
	"secondary_outcomes" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"protocol_version_id" uuid,
	"design" "study_design" DEFAULT 'parallel' NOT NULL,
	"analysis_plan" jsonb,
	"randomization" jsonb,
	"preparer_id" uuid,
	"state" "study_state" DEFAULT 'draft' NOT NULL,
	"seed" text,
	"algorithm_version" integer,
	"design_hash" text,
	"schedule_hash" text,
	"blinded_snapshot" jsonb,
	"snapshot_hash" text,
	"is_demo" boolean DEFAULT false NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"randomized_at" timestamp with time zone,
	"started_at" timestamp with time zone,
	"closed_at" timestamp with time zone,
	"unblinded_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "study_arms" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"lab_id" uuid NOT NULL,
	"name" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"sharpening_recipe" jsonb,
	"position" integer NOT NULL,
	"neutral_label" text
);
--> statement-breakpoint
CREATE TABLE "study_blades" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"lab_id" uuid NOT NULL,
	"blade_id" uuid NOT NULL,
	"arm_id" uuid,
	"blind_code" text,
	"enrolled_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "study_testers" (
	"study_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	CONSTRAINT "study_testers_study_id_user_id_pk" PRIMARY KEY("study_id","user_id")
);
--> statement-breakpoint
ALTER TABLE "randomization_rolls" ADD CONSTRAINT "randomization_rolls_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "randomization_rolls" ADD CONSTRAINT "randomization_rolls_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "randomization_rolls" ADD CONSTRAINT "randomization_rolls_rolled_by_users_id_fk" FOREIGN KEY ("rolled_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_supersedes_id_readings_id_fk" FOREIGN KEY ("supersedes_id") REFERENCES "public"."readings"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_entered_by_users_id_fk" FOREIGN KEY ("entered_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_events" ADD CONSTRAINT "run_events_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_events" ADD CONSTRAINT "run_events_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_events" ADD CONSTRAINT "run_events_photo_file_id_stored_files_id_fk" FOREIGN KEY ("photo_file_id") REFERENCES "public"."stored_files"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_events" ADD CONSTRAINT "run_events_entered_by_users_id_fk" FOREIGN KEY ("entered_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_study_blade_id_study_blades_id_fk" FOREIGN KEY ("study_blade_id") REFERENCES "public"."study_blades"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_arm_id_study_arms_id_fk" FOREIGN KEY ("arm_id") REFERENCES "public"."study_arms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_tester_id_users_id_fk" FOREIGN KEY ("tester_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_media_lot_id_media_lots_id_fk" FOREIGN KEY ("media_lot_id") REFERENCES "public"."media_lots"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_instrument_id_instruments_id_fk" FOREIGN KEY ("instrument_id") REFERENCES "public"."instruments"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "studies" ADD CONSTRAINT "studies_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "studies" ADD CONSTRAINT "studies_protocol_version_id_protocol_versions_id_fk" FOREIGN KEY ("protocol_version_id") REFERENCES "public"."protocol_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "studies" ADD CONSTRAINT "studies_preparer_id_users_id_fk" FOREIGN KEY ("preparer_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "studies" ADD CONSTRAINT "studies_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "study_arms" ADD CONSTRAINT "study_arms_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "study_arms" ADD CONSTRAINT "study_arms_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "study_blades" ADD CONSTRAINT "study_blades_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "study_blades" ADD CONSTRAINT "study_blades_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "study_blades" ADD CONSTRAINT "study_blades_blade_id_blades_id_fk" FOREIGN KEY ("blade_id") REFERENCES "public"."blades"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "study_blades" ADD CONSTRAINT "study_blades_arm_id_study_arms_id_fk" FOREIGN KEY ("arm_id") REFERENCES "public"."study_arms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "study_testers" ADD CONSTRAINT "study_testers_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "study_testers" ADD CONSTRAINT "study_testers_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "readings_idempotency" ON "readings" USING btree ("run_id","idempotency_key");--> statement-breakpoint
CREATE INDEX "readings_run" ON "readings" USING btree ("run_id","attempt","cut");--> statement-breakpoint
CREATE INDEX "run_events_run" ON "run_events" USING btree ("run_id");--> statement-breakpoint
CREATE UNIQUE INDEX "run_events_idempotency" ON "run_events" USING btree ("run_id","idempotency_key");--> statement-breakpoint
CREATE INDEX "runs_study_position" ON "runs" USING btree ("study_id","schedule_position");--> statement-breakpoint
CREATE INDEX "runs_tester" ON "runs" USING btree ("tester_id","state");--> statement-breakpoint
CREATE INDEX "studies_lab" ON "studies" USING btree ("lab_id");--> statement-breakpoint
CREATE INDEX "study_arms_study" ON "study_arms" USING btree ("study_id");--> statement-breakpoint
CREATE UNIQUE INDEX "study_blades_once" ON "study_blades" USING btree ("study_id","blade_id");--> statement-breakpoint
CREATE UNIQUE INDEX "study_blades_code" ON "study_blades" USING btree ("lab_id","blind_code");