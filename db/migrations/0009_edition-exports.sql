CREATE TABLE "edition_exports" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"edition_id" uuid NOT NULL,
	"state" text DEFAULT 'queued' NOT NULL,
	"options" jsonb NOT NULL,
	"progress" real DEFAULT 0 NOT NULL,
	"stage" text,
	"object_key" text,
	"zip_name" text,
	"bytes" bigint,
	"files" jsonb,
	"warnings" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"error" text,
	"requested_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "edition_exports" ADD CONSTRAINT "edition_exports_edition_id_editions_id_fk" FOREIGN KEY ("edition_id") REFERENCES "public"."editions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "edition_exports" ADD CONSTRAINT "edition_exports_requested_by_users_id_fk" FOREIGN KEY ("requested_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "edition_exports_edition_idx" ON "edition_exports" USING btree ("edition_id","created_at");