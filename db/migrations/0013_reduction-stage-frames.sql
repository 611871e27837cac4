ALTER TABLE "reductions" ADD COLUMN "stage_frames_done" integer;--> statement-breakpoint
ALTER TABLE "reductions" ADD COLUMN "stage_frames_total" integer;