CREATE TYPE "public"."blade_status" AS ENUM('in_lab', 'out', 'retired');--> statement-breakpoint
CREATE TYPE "public"."custody_kind" AS ENUM('received', 'sent', 'returned', 'handed');--> statement-breakpoint
CREATE TYPE "public"."instrument_kind" AS ENUM('sharpness_tester', 'card_machine');--> statement-breakpoint
CREATE TYPE "public"."medium_kind" AS ENUM('rope', 'card');--> statement-breakpoint
CREATE TABLE "blades" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"inventory_number" text NOT NULL,
	"steel" text NOT NULL,
	"hardness_hrc" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"heat_treatment" text DEFAULT '' NOT NULL,
	"source" text DEFAULT '' NOT NULL,
	"blade_length_mm" double precision,
	"edge_length_mm" double precision,
	"edge_thickness_mm" double precision,
	"edge_thickness_at_mm" double precision,
	"edge_angle_deg" double precision,
	"edge_finish" text DEFAULT '' NOT NULL,
	"status" "blade_status" DEFAULT 'in_lab' NOT NULL,
	"photo_file_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "calibration_checks" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"instrument_id" uuid NOT NULL,
	"on" date NOT NULL,
	"reference_value" double precision NOT NULL,
	"reading" double precision NOT NULL,
	"tolerance" double precision NOT NULL,
	"passed" boolean NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"recorded_by" uuid,
	"recorded_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "custody_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"blade_id" uuid NOT NULL,
	"kind" "custody_kind" NOT NULL,
	"on" date NOT NULL,
	"holder" text NOT NULL,
	"condition" text DEFAULT '' NOT NULL,
	"photo_file_id" uuid,
	"recorded_by" uuid,
	"recorded_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "instruments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"name" text NOT NULL,
	"kind" "instrument_kind" NOT NULL,
	"test_medium" text NOT NULL,
	"resolution" double precision NOT NULL,
	"max_reading" double precision,
	"calibration_interval_days" integer NOT NULL,
	"retired" boolean DEFAULT false NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "media" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"name" text NOT NULL,
	"kind" "medium_kind" NOT NULL,
	"material" text NOT NULL,
	"size_mm" double precision NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "media_lots" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"medium_id" uuid NOT NULL,
	"lot_code" text NOT NULL,
	"received_on" date NOT NULL,
	"conditioning" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "stored_files" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"storage_key" text NOT NULL,
	"content_type" text NOT NULL,
	"byte_size" integer NOT NULL,
	"sha256" text NOT NULL,
	"uploaded_by" uuid,
	"uploaded_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "stored_files_storage_key_unique" UNIQUE("storage_key")
);
--> statement-breakpoint
ALTER TABLE "blades" ADD CONSTRAINT "blades_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "blades" ADD CONSTRAINT "blades_photo_file_id_stored_files_id_fk" FOREIGN KEY ("photo_file_id") REFERENCES "public"."stored_files"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calibration_checks" ADD CONSTRAINT "calibration_checks_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calibration_checks" ADD CONSTRAINT "calibration_checks_instrument_id_instruments_id_fk" FOREIGN KEY ("instrument_id") REFERENCES "public"."instruments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calibration_checks" ADD CONSTRAINT "calibration_checks_recorded_by_users_id_fk" FOREIGN KEY ("recorded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "custody_events" ADD CONSTRAINT "custody_events_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "custody_events" ADD CONSTRAINT "custody_events_blade_id_blades_id_fk" FOREIGN KEY ("blade_id") REFERENCES "public"."blades"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "custody_events" ADD CONSTRAINT "custody_events_photo_file_id_stored_files_id_fk" FOREIGN KEY ("photo_file_id") REFERENCES "public"."stored_files"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "custody_events" ADD CONSTRAINT "custody_events_recorded_by_users_id_fk" FOREIGN KEY ("recorded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "instruments" ADD CONSTRAINT "instruments_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "media" ADD CONSTRAINT "media_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "media_lots" ADD CONSTRAINT "media_lots_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "media_lots" ADD CONSTRAINT "media_lots_medium_id_media_id_fk" FOREIGN KEY ("medium_id") REFERENCES "public"."media"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "stored_files" ADD CONSTRAINT "stored_files_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "stored_files" ADD CONSTRAINT "stored_files_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "blades_lab_inventory" ON "blades" USING btree ("lab_id",lower("inventory_number"));--> statement-breakpoint
CREATE INDEX "blades_lab" ON "blades" USING btree ("lab_id");--> statement-breakpoint
CREATE INDEX "calibration_instrument" ON "calibration_checks" USING btree ("instrument_id","on");--> statement-breakpoint
CREATE INDEX "custody_blade" ON "custody_events" USING btree ("blade_id","on");--> statement-breakpoint
CREATE UNIQUE INDEX "instruments_lab_name" ON "instruments" USING btree ("lab_id",lower("name"));--> statement-breakpoint
CREATE INDEX "media_lab" ON "media" USING btree ("lab_id");--> statement-breakpoint
CREATE UNIQUE INDEX "media_lots_code" ON "media_lots" USING btree ("medium_id","lot_code");--> statement-breakpoint
CREATE INDEX "stored_files_lab" ON "stored_files" USING btree ("lab_id");