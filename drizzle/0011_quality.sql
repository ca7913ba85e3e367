CREATE TYPE "public"."study_kind" AS ENUM('trial', 'reference', 'precision');--> statement-breakpoint
CREATE TABLE "precision_readings" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"study_id" uuid NOT NULL,
	"tester_id" uuid NOT NULL,
	"blade_id" uuid NOT NULL,
	"repeat" integer NOT NULL,
	"value_gf" double precision NOT NULL,
	"content_hash" text NOT NULL,
	"entered_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "precision_studies" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"instrument_id" uuid NOT NULL,
	"name" text NOT NULL,
	"tester_ids" jsonb NOT NULL,
	"edge_blade_ids" jsonb NOT NULL,
	"repeats" integer NOT NULL,
	"seed" text NOT NULL,
	"reading_order" jsonb NOT NULL,
	"finished_at" timestamp with time zone,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "reference_blades" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"blade_id" uuid NOT NULL,
	"protocol_version_id" uuid NOT NULL,
	"series_study_id" uuid NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"marked_by" uuid,
	"marked_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "media_lots" ADD COLUMN "required_reference_runs" integer;--> statement-breakpoint
ALTER TABLE "studies" ADD COLUMN "kind" "study_kind" DEFAULT 'trial' NOT NULL;--> statement-breakpoint
ALTER TABLE "precision_readings" ADD CONSTRAINT "precision_readings_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "precision_readings" ADD CONSTRAINT "precision_readings_study_id_precision_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."precision_studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "precision_readings" ADD CONSTRAINT "precision_readings_tester_id_users_id_fk" FOREIGN KEY ("tester_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "precision_readings" ADD CONSTRAINT "precision_readings_blade_id_blades_id_fk" FOREIGN KEY ("blade_id") REFERENCES "public"."blades"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "precision_studies" ADD CONSTRAINT "precision_studies_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "precision_studies" ADD CONSTRAINT "precision_studies_instrument_id_instruments_id_fk" FOREIGN KEY ("instrument_id") REFERENCES "public"."instruments"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "precision_studies" ADD CONSTRAINT "precision_studies_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reference_blades" ADD CONSTRAINT "reference_blades_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reference_blades" ADD CONSTRAINT "reference_blades_blade_id_blades_id_fk" FOREIGN KEY ("blade_id") REFERENCES "public"."blades"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reference_blades" ADD CONSTRAINT "reference_blades_protocol_version_id_protocol_versions_id_fk" FOREIGN KEY ("protocol_version_id") REFERENCES "public"."protocol_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reference_blades" ADD CONSTRAINT "reference_blades_series_study_id_studies_id_fk" FOREIGN KEY ("series_study_id") REFERENCES "public"."studies"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reference_blades" ADD CONSTRAINT "reference_blades_marked_by_users_id_fk" FOREIGN KEY ("marked_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "precision_readings_slot" ON "precision_readings" USING btree ("study_id","tester_id","blade_id","repeat");--> statement-breakpoint
CREATE INDEX "precision_studies_instrument" ON "precision_studies" USING btree ("lab_id","instrument_id");--> statement-breakpoint
CREATE UNIQUE INDEX "reference_blades_once" ON "reference_blades" USING btree ("lab_id","blade_id");--> statement-breakpoint
CREATE INDEX "reference_blades_lab" ON "reference_blades" USING btree ("lab_id");