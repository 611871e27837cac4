ALTER TABLE "bracket_sets" ADD COLUMN "north_angle_deg" real;--> statement-breakpoint
ALTER TABLE "frames" ADD COLUMN "given_capture_at" timestamp (3) with time zone;--> statement-breakpoint
ALTER TABLE "frames" ADD COLUMN "given_capture_source" text;--> statement-breakpoint
ALTER TABLE "frames" ADD CONSTRAINT "frames_given_capture_source" CHECK (("frames"."given_capture_at" is null) = ("frames"."given_capture_source" is null));