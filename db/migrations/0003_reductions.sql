CREATE TABLE "reductions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"bracket_set_id" uuid NOT NULL,
	"requested_by" text,
	"params" jsonb NOT NULL,
	"state" text DEFAULT 'queued' NOT NULL,
	"stage" text,
	"progress" real DEFAULT 0 NOT NULL,
	"error" text,
	"pipeline_version" text,
	"outputs" jsonb,
	"measurements" jsonb,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "reductions" ADD CONSTRAINT "reductions_bracket_set_id_bracket_sets_id_fk" FOREIGN KEY ("bracket_set_id") REFERENCES "public"."bracket_sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reductions" ADD CONSTRAINT "reductions_requested_by_users_id_fk" FOREIGN KEY ("requested_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "reductions_set_idx" ON "reductions" USING btree ("bracket_set_id");