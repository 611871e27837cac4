CREATE TABLE "eclipses" (
	"id" text PRIMARY KEY NOT NULL,
	"peak_at" timestamp with time zone NOT NULL,
	"kind" text NOT NULL,
	"peak_lat_deg" double precision,
	"peak_lon_deg" double precision,
	"name" text,
	"featured" boolean DEFAULT false NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "field_plans" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"owner_id" text NOT NULL,
	"name" text NOT NULL,
	"eclipse_id" text NOT NULL,
	"site_id" uuid,
	"lat_deg" double precision NOT NULL,
	"lon_deg" double precision NOT NULL,
	"elevation_m" double precision DEFAULT 0 NOT NULL,
	"kit_id" uuid,
	"isos" integer[] NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "kits" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"owner_id" text NOT NULL,
	"name" text NOT NULL,
	"camera" text NOT NULL,
	"sensor_width_mm" double precision NOT NULL,
	"sensor_height_mm" double precision NOT NULL,
	"pixel_pitch_um" double precision NOT NULL,
	"focal_mm" double precision NOT NULL,
	"teleconverter" double precision DEFAULT 1 NOT NULL,
	"f_number" double precision NOT NULL,
	"mount" text NOT NULL,
	"flip_horizontal" boolean DEFAULT false NOT NULL,
	"flip_vertical" boolean DEFAULT false NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "kits_positive_optics" CHECK ("kits"."focal_mm" > 0 and "kits"."pixel_pitch_um" > 0 and "kits"."f_number" > 0 and "kits"."teleconverter" > 0)
);
--> statement-breakpoint
CREATE TABLE "sites" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"owner_id" text NOT NULL,
	"name" text NOT NULL,
	"kind" text NOT NULL,
	"lat_deg" double precision NOT NULL,
	"lon_deg" double precision NOT NULL,
	"elevation_m" double precision DEFAULT 0 NOT NULL,
	"precision" text DEFAULT 'rounded' NOT NULL,
	"track" jsonb,
	"track_file_name" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "sites_lat_range" CHECK ("sites"."lat_deg" between -90 and 90),
	CONSTRAINT "sites_lon_range" CHECK ("sites"."lon_deg" between -180 and 180)
);
--> statement-breakpoint
ALTER TABLE "field_plans" ADD CONSTRAINT "field_plans_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "field_plans" ADD CONSTRAINT "field_plans_eclipse_id_eclipses_id_fk" FOREIGN KEY ("eclipse_id") REFERENCES "public"."eclipses"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "field_plans" ADD CONSTRAINT "field_plans_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "field_plans" ADD CONSTRAINT "field_plans_kit_id_kits_id_fk" FOREIGN KEY ("kit_id") REFERENCES "public"."kits"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "kits" ADD CONSTRAINT "kits_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sites" ADD CONSTRAINT "sites_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "field_plans_owner_idx" ON "field_plans" USING btree ("owner_id");--> statement-breakpoint
CREATE INDEX "kits_owner_idx" ON "kits" USING btree ("owner_id");--> statement-breakpoint
CREATE INDEX "sites_owner_idx" ON "sites" USING btree ("owner_id");