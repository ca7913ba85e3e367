CREATE TABLE "reset_requests" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" text NOT NULL,
	"client_address" text NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "sign_in_failures" ADD COLUMN "client_address" text;--> statement-breakpoint
CREATE INDEX "reset_requests_email_at" ON "reset_requests" USING btree ("email","at");--> statement-breakpoint
CREATE INDEX "reset_requests_client_at" ON "reset_requests" USING btree ("client_address","at");--> statement-breakpoint
CREATE INDEX "sign_in_failures_client_at" ON "sign_in_failures" USING btree ("client_address","at");