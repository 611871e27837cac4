CREATE TABLE "bracket_sets" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"owner_id" text NOT NULL,
	"eclipse_id" text NOT NULL,
	"site_id" uuid NOT NULL,
	"kit_id" uuid,
	"name" text NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"clock_offset_s" real DEFAULT 0 NOT NULL,
	"state" text DEFAULT 'gathering' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "frames" (
	"id" uuid PRIMARY KEY NOT NULL,
	"bracket_set_id" uuid NOT NULL,
	"original_key" text NOT NULL,
	"original_file_name" text NOT NULL,
	"size_bytes" bigint NOT NULL,
	"sha256" text,
	"format" text,
	"width" integer,
	"height" integer,
	"bit_depth" integer,
	"exposure_s" double precision,
	"exposure_source" text,
	"f_number" double precision,
	"iso" double precision,
	"capture_at" timestamp (3) with time zone,
	"make" text,
	"model" text,
	"kind" text DEFAULT 'light' NOT NULL,
	"included" boolean DEFAULT true NOT NULL,
	"ingest_state" text DEFAULT 'received' NOT NULL,
	"refusal_reason" text,
	"thumbnail_key" text,
	"flags" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "frames_positive_exposure" CHECK ("frames"."exposure_s" is null or "frames"."exposure_s" > 0)
);
--> statement-breakpoint
CREATE TABLE "uploads" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"bracket_set_id" uuid NOT NULL,
	"frame_id" uuid NOT NULL,
	"s3_upload_id" text NOT NULL,
	"key" text NOT NULL,
	"file_name" text NOT NULL,
	"size_bytes" bigint NOT NULL,
	"part_size_bytes" integer NOT NULL,
	"state" text DEFAULT 'open' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "bracket_sets" ADD CONSTRAINT "bracket_sets_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bracket_sets" ADD CONSTRAINT "bracket_sets_eclipse_id_eclipses_id_fk" FOREIGN KEY ("eclipse_id") REFERENCES "public"."eclipses"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bracket_sets" ADD CONSTRAINT "bracket_sets_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bracket_sets" ADD CONSTRAINT "bracket_sets_kit_id_kits_id_fk" FOREIGN KEY ("kit_id") REFERENCES "public"."kits"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "frames" ADD CONSTRAINT "frames_bracket_set_id_bracket_sets_id_fk" FOREIGN KEY ("bracket_set_id") REFERENCES "public"."bracket_sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_bracket_set_id_bracket_sets_id_fk" FOREIGN KEY ("bracket_set_id") REFERENCES "public"."bracket_sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "bracket_sets_owner_idx" ON "bracket_sets" USING btree ("owner_id");--> statement-breakpoint
CREATE INDEX "bracket_sets_eclipse_idx" ON "bracket_sets" USING btree ("eclipse_id");--> statement-breakpoint
CREATE INDEX "frames_bracket_set_idx" ON "frames" USING btree ("bracket_set_id");--> statement-breakpoint
CREATE UNIQUE INDEX "frames_bracket_set_sha256_key" ON "frames" USING btree ("bracket_set_id","sha256");--> statement-breakpoint
CREATE INDEX "uploads_bracket_set_idx" ON "uploads" USING btree ("bracket_set_id");--> statement-breakpoint
CREATE INDEX "uploads_state_created_idx" ON "uploads" USING btree ("state","created_at");