CREATE TABLE "curator_notes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"bracket_set_id" uuid NOT NULL,
	"author_id" text,
	"decision_id" uuid,
	"body" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "review_assignments" (
	"bracket_set_id" uuid PRIMARY KEY NOT NULL,
	"curator_id" text NOT NULL,
	"assigned_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "review_decisions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"bracket_set_id" uuid NOT NULL,
	"from_state" text NOT NULL,
	"to_state" text NOT NULL,
	"action" text NOT NULL,
	"reason_code" text,
	"reason_label" text,
	"message_to_photographer" text,
	"decided_by" text,
	"reduction_id" uuid,
	"pipeline_version" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "society_settings" ADD COLUMN "credit_line_template" text DEFAULT '{acquiredBy} / {society}; processing: {processedBy}' NOT NULL;--> statement-breakpoint
ALTER TABLE "society_settings" ADD COLUMN "change_reasons" jsonb DEFAULT '[{"code":"exposure-times","label":"Exposure times missing or wrong"},{"code":"mixed-brackets","label":"Frames from more than one bracket"},{"code":"clock-offset","label":"Clock offset doubtful"},{"code":"calibration","label":"Calibration frames missing or mismatched"},{"code":"frame-selection","label":"Frames to include or exclude"},{"code":"site-or-kit","label":"Site or kit details incomplete"}]'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "society_settings" ADD COLUMN "rejection_reasons" jsonb DEFAULT '[{"code":"not-the-sun","label":"Not the Sun"},{"code":"not-totality","label":"Not taken during totality"},{"code":"rights-unclear","label":"Rights unclear"},{"code":"duplicate","label":"Already submitted as another set"},{"code":"unusable","label":"Frames unusable (focus, cloud or motion)"}]'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "curator_notes" ADD CONSTRAINT "curator_notes_bracket_set_id_bracket_sets_id_fk" FOREIGN KEY ("bracket_set_id") REFERENCES "public"."bracket_sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "curator_notes" ADD CONSTRAINT "curator_notes_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "curator_notes" ADD CONSTRAINT "curator_notes_decision_id_review_decisions_id_fk" FOREIGN KEY ("decision_id") REFERENCES "public"."review_decisions"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_assignments" ADD CONSTRAINT "review_assignments_bracket_set_id_bracket_sets_id_fk" FOREIGN KEY ("bracket_set_id") REFERENCES "public"."bracket_sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_assignments" ADD CONSTRAINT "review_assignments_curator_id_users_id_fk" FOREIGN KEY ("curator_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_decisions" ADD CONSTRAINT "review_decisions_bracket_set_id_bracket_sets_id_fk" FOREIGN KEY ("bracket_set_id") REFERENCES "public"."bracket_sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_decisions" ADD CONSTRAINT "review_decisions_decided_by_users_id_fk" FOREIGN KEY ("decided_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "review_decisions" ADD CONSTRAINT "review_decisions_reduction_id_reductions_id_fk" FOREIGN KEY ("reduction_id") REFERENCES "public"."reductions"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "curator_notes_set_idx" ON "curator_notes" USING btree ("bracket_set_id","created_at");--> statement-breakpoint
CREATE INDEX "review_decisions_set_idx" ON "review_decisions" USING btree ("bracket_set_id","created_at");--> statement-breakpoint
-- The audit log is append-only. Rows are never changed or removed; the one
-- change allowed is the foreign key's own "set null" when a person is deleted.
CREATE OR REPLACE FUNCTION audit_log_append_only() RETURNS trigger AS $$
BEGIN
  IF TG_OP = 'UPDATE' AND NEW.actor_id IS NULL AND OLD.actor_id IS NOT NULL
     AND NEW.id = OLD.id AND NEW.action = OLD.action AND NEW.subject_type = OLD.subject_type
     AND NEW.subject_id = OLD.subject_id AND NEW.detail = OLD.detail AND NEW.created_at = OLD.created_at THEN
    RETURN NEW;
  END IF;
  RAISE EXCEPTION 'audit_log is append-only: % refused', TG_OP;
END;
$$ LANGUAGE plpgsql;--> statement-breakpoint
CREATE TRIGGER audit_log_append_only BEFORE UPDATE OR DELETE ON "audit_log" FOR EACH ROW EXECUTE FUNCTION audit_log_append_only();
