CREATE TABLE "composite_inputs" (
	"composite_id" uuid NOT NULL,
	"position" integer NOT NULL,
	"reduction_id" uuid NOT NULL,
	CONSTRAINT "composite_inputs_composite_id_position_pk" PRIMARY KEY("composite_id","position")
);
--> statement-breakpoint
CREATE TABLE "composites" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"eclipse_id" text NOT NULL,
	"composed_by" text,
	"title" text NOT NULL,
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
ALTER TABLE "composite_inputs" ADD CONSTRAINT "composite_inputs_composite_id_composites_id_fk" FOREIGN KEY ("composite_id") REFERENCES "public"."composites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "composite_inputs" ADD CONSTRAINT "composite_inputs_reduction_id_reductions_id_fk" FOREIGN KEY ("reduction_id") REFERENCES "public"."reductions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "composites" ADD CONSTRAINT "composites_eclipse_id_eclipses_id_fk" FOREIGN KEY ("eclipse_id") REFERENCES "public"."eclipses"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "composites" ADD CONSTRAINT "composites_composed_by_users_id_fk" FOREIGN KEY ("composed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "composite_inputs_reduction_idx" ON "composite_inputs" USING btree ("reduction_id");--> statement-breakpoint
CREATE INDEX "composites_composed_by_idx" ON "composites" USING btree ("composed_by");--> statement-breakpoint
CREATE INDEX "composites_eclipse_idx" ON "composites" USING btree ("eclipse_id");