CREATE TYPE "public"."protocol_version_state" AS ENUM('draft', 'published');--> statement-breakpoint
CREATE TABLE "protocol_versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"protocol_id" uuid NOT NULL,
	"lab_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"state" "protocol_version_state" DEFAULT 'draft' NOT NULL,
	"content" jsonb NOT NULL,
	"content_hash" text,
	"based_on_version" integer,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"published_at" timestamp with time zone,
	"published_by" uuid,
	CONSTRAINT "protocol_versions_version_positive" CHECK ("protocol_versions"."version" >= 1),
	CONSTRAINT "protocol_versions_published_complete" CHECK ("protocol_versions"."state" <> 'published' OR ("protocol_versions"."content_hash" IS NOT NULL AND "protocol_versions"."published_at" IS NOT NULL))
);
--> statement-breakpoint
CREATE TABLE "protocols" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"lab_id" uuid NOT NULL,
	"name" text NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "protocol_versions" ADD CONSTRAINT "protocol_versions_protocol_id_protocols_id_fk" FOREIGN KEY ("protocol_id") REFERENCES "public"."protocols"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "protocol_versions" ADD CONSTRAINT "protocol_versions_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "protocol_versions" ADD CONSTRAINT "protocol_versions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "protocol_versions" ADD CONSTRAINT "protocol_versions_published_by_users_id_fk" FOREIGN KEY ("published_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "protocols" ADD CONSTRAINT "protocols_lab_id_labs_id_fk" FOREIGN KEY ("lab_id") REFERENCES "public"."labs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "protocols" ADD CONSTRAINT "protocols_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "protocol_versions_number" ON "protocol_versions" USING btree ("protocol_id","version");--> statement-breakpoint
CREATE UNIQUE INDEX "protocol_versions_one_draft" ON "protocol_versions" USING btree ("protocol_id") WHERE "protocol_versions"."state" = 'draft';--> statement-breakpoint
CREATE INDEX "protocol_versions_lab" ON "protocol_versions" USING btree ("lab_id");--> statement-breakpoint
CREATE INDEX "protocols_lab" ON "protocols" USING btree ("lab_id");