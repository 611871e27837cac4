DROP INDEX "frames_bracket_set_sha256_key";--> statement-breakpoint
ALTER TABLE "sites" ADD COLUMN "public_label" text DEFAULT '' NOT NULL;--> statement-breakpoint
CREATE UNIQUE INDEX "frames_bracket_set_sha256_key" ON "frames" USING btree ("bracket_set_id","sha256") WHERE "frames"."ingest_state" <> 'refused';