// The society's own settings (one row) and the audit log every decision writes.
import { bigserial, index, integer, jsonb, pgTable, text, timestamp } from "drizzle-orm/pg-core";
import { users } from "./auth";

export interface ReviewReason {
  code: string;
  label: string;
}

export const DEFAULT_CHANGE_REASONS: ReviewReason[] = [
  { code: "exposure-times", label: "Exposure times missing or wrong" },
  { code: "mixed-brackets", label: "Frames from more than one bracket" },
  { code: "clock-offset", label: "Clock offset doubtful" },
  { code: "calibration", label: "Calibration frames missing or mismatched" },
  { code: "frame-selection", label: "Frames to include or exclude" },
  { code: "site-or-kit", label: "Site or kit details incomplete" },
];

export const DEFAULT_REJECTION_REASONS: ReviewReason[] = [
  { code: "not-the-sun", label: "Not the Sun" },
  { code: "not-totality", label: "Not taken during totality" },
  { code: "rights-unclear", label: "Rights unclear" },
  { code: "duplicate", label: "Already submitted as another set" },
  { code: "unusable", label: "Frames unusable (focus, cloud or motion)" },
];

export const societySettings = pgTable("society_settings", {
  // A single row with id 1; the check keeps it single.
  id: integer("id").primaryKey().default(1),
  name: text("name").notNull(),
  shortName: text("short_name").notNull(),
  defaultLicence: text("default_licence").notNull().default("CC-BY-4.0"),
  defaultCreditLine: text("default_credit_line").notNull(),
  // Filled by lib/review/credit-line.ts; placeholders {acquiredBy}, {processedBy}, {society}, {year}, {licence}.
  creditLineTemplate: text("credit_line_template").notNull().default("{acquiredBy} / {society}; processing: {processedBy}"),
  // The reasons a curator picks from when asking for changes or rejecting a set.
  changeReasons: jsonb("change_reasons").$type<ReviewReason[]>().notNull().default(DEFAULT_CHANGE_REASONS),
  rejectionReasons: jsonb("rejection_reasons").$type<ReviewReason[]>().notNull().default(DEFAULT_REJECTION_REASONS),
  siteTextLicenceName: text("site_text_licence_name").notNull().default("CC BY 4.0"),
  siteTextLicenceUrl: text("site_text_licence_url").notNull().default("https://creativecommons.org/licenses/by/4.0/"),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

export const auditLog = pgTable(
  "audit_log",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    actorId: text("actor_id").references(() => users.id, { onDelete: "set null" }),
    action: text("action").notNull(),
    subjectType: text("subject_type").notNull(),
    subjectId: text("subject_id").notNull(),
    detail: jsonb("detail").$type<Record<string, unknown>>().notNull().default({}),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("audit_log_subject_idx").on(t.subjectType, t.subjectId), index("audit_log_created_idx").on(t.createdAt)],
);

export type SocietySettings = typeof societySettings.$inferSelect;
export type AuditEntry = typeof auditLog.$inferSelect;
