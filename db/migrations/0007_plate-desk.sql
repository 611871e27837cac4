CREATE TABLE "plate_reports" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"plate_id" uuid NOT NULL,
	"kind" text NOT NULL,
	"message" text NOT NULL,
	"reporter_email" text NOT NULL,
	"state" text DEFAULT 'open' NOT NULL,
	"answer" text,
	"answered_by" text,
	"answered_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "plates" ADD COLUMN "withdrawn_kind" text;--> statement-breakpoint
ALTER TABLE "plate_reports" ADD CONSTRAINT "plate_reports_plate_id_plates_id_fk" FOREIGN KEY ("plate_id") REFERENCES "public"."plates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plate_reports" ADD CONSTRAINT "plate_reports_answered_by_users_id_fk" FOREIGN KEY ("answered_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "plate_reports_plate_state_idx" ON "plate_reports" USING btree ("plate_id","state");