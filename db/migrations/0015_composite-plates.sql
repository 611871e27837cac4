ALTER TABLE "plate_versions" ALTER COLUMN "reduction_id" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "plates" ALTER COLUMN "bracket_set_id" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "plate_versions" ADD COLUMN "composite_id" uuid;--> statement-breakpoint
ALTER TABLE "plate_versions" ADD CONSTRAINT "plate_versions_composite_id_composites_id_fk" FOREIGN KEY ("composite_id") REFERENCES "public"."composites"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "plate_versions_composite_idx" ON "plate_versions" USING btree ("composite_id");--> statement-breakpoint
ALTER TABLE "plate_versions" ADD CONSTRAINT "plate_versions_one_source" CHECK (("plate_versions"."reduction_id" is null) <> ("plate_versions"."composite_id" is null));