CREATE TABLE "edition_items" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"edition_id" uuid NOT NULL,
	"plate_id" uuid NOT NULL,
	"plate_version" integer NOT NULL,
	"position" integer NOT NULL,
	"slot" text DEFAULT 'single-column' NOT NULL,
	"custom_width_mm" real,
	"custom_dpi" integer,
	"rendition" text NOT NULL,
	"caption_override" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "editions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"title" text NOT NULL,
	"kind" text NOT NULL,
	"issue_label" text DEFAULT '' NOT NULL,
	"embargo_date" date,
	"state" text DEFAULT 'draft' NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "edition_items" ADD CONSTRAINT "edition_items_edition_id_editions_id_fk" FOREIGN KEY ("edition_id") REFERENCES "public"."editions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "edition_items" ADD CONSTRAINT "edition_items_plate_id_plates_id_fk" FOREIGN KEY ("plate_id") REFERENCES "public"."plates"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "editions" ADD CONSTRAINT "editions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "edition_items_edition_plate_key" ON "edition_items" USING btree ("edition_id","plate_id");--> statement-breakpoint
CREATE INDEX "edition_items_plate_idx" ON "edition_items" USING btree ("plate_id");--> statement-breakpoint
CREATE INDEX "edition_items_edition_position_idx" ON "edition_items" USING btree ("edition_id","position");--> statement-breakpoint
CREATE INDEX "editions_created_idx" ON "editions" USING btree ("created_at");