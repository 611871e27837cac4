CREATE TABLE "plate_versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"plate_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"reduction_id" uuid NOT NULL,
	"renditions" jsonb NOT NULL,
	"image_sizes" jsonb NOT NULL,
	"geometry" jsonb NOT NULL,
	"facts" jsonb NOT NULL,
	"change_note" text DEFAULT '' NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "plates" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"slug" text NOT NULL,
	"bracket_set_id" uuid NOT NULL,
	"eclipse_id" text NOT NULL,
	"state" text DEFAULT 'draft' NOT NULL,
	"title" text NOT NULL,
	"caption" text DEFAULT '' NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"alt_text" text NOT NULL,
	"acquired_by" text NOT NULL,
	"processed_by" text NOT NULL,
	"licence" text NOT NULL,
	"site_country" text,
	"featured" boolean DEFAULT false NOT NULL,
	"current_version" integer DEFAULT 1 NOT NULL,
	"published_at" timestamp with time zone,
	"withdrawn_at" timestamp with time zone,
	"withdrawn_reason" text,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "plate_versions" ADD CONSTRAINT "plate_versions_plate_id_plates_id_fk" FOREIGN KEY ("plate_id") REFERENCES "public"."plates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plate_versions" ADD CONSTRAINT "plate_versions_reduction_id_reductions_id_fk" FOREIGN KEY ("reduction_id") REFERENCES "public"."reductions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plate_versions" ADD CONSTRAINT "plate_versions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plates" ADD CONSTRAINT "plates_bracket_set_id_bracket_sets_id_fk" FOREIGN KEY ("bracket_set_id") REFERENCES "public"."bracket_sets"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plates" ADD CONSTRAINT "plates_eclipse_id_eclipses_id_fk" FOREIGN KEY ("eclipse_id") REFERENCES "public"."eclipses"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plates" ADD CONSTRAINT "plates_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "plate_versions_plate_version_key" ON "plate_versions" USING btree ("plate_id","version");--> statement-breakpoint
CREATE INDEX "plate_versions_reduction_idx" ON "plate_versions" USING btree ("reduction_id");--> statement-breakpoint
CREATE UNIQUE INDEX "plates_slug_key" ON "plates" USING btree ("slug");--> statement-breakpoint
CREATE INDEX "plates_state_published_idx" ON "plates" USING btree ("state","published_at");--> statement-breakpoint
CREATE INDEX "plates_eclipse_idx" ON "plates" USING btree ("eclipse_id");