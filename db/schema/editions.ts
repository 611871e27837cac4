// Editions: issues of the society's newsletter or journal that the editor
// builds from published plates. Each item pins the plate version it was
// chosen at, a layout slot (a preset, or a custom width in mm at a dpi), the
// rendition and an optional caption for this edition only.
import { bigint, date, index, integer, jsonb, pgTable, real, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { plates, type Rendition } from "./plates";

export const EDITION_KINDS = ["newsletter", "journal"] as const;
export type EditionKind = (typeof EDITION_KINDS)[number];
export const EDITION_STATES = ["draft", "exported"] as const;
export type EditionState = (typeof EDITION_STATES)[number];
/** Mirrors lib/editions/print-sizes.ts SLOT_KEYS; kept here so the schema needs no lib import. */
export const EDITION_SLOTS = ["single-column", "wide-column", "full-width", "cover", "web", "custom"] as const;
export type EditionSlot = (typeof EDITION_SLOTS)[number];

export const editions = pgTable(
  "editions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    title: text("title").notNull(),
    kind: text("kind", { enum: EDITION_KINDS }).notNull(),
    issueLabel: text("issue_label").notNull().default(""),
    /** Nothing of this edition may appear elsewhere before this day. */
    embargoDate: date("embargo_date", { mode: "string" }),
    state: text("state", { enum: EDITION_STATES }).notNull().default("draft"),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("editions_created_idx").on(t.createdAt)],
);

export const editionItems = pgTable(
  "edition_items",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    editionId: uuid("edition_id")
      .notNull()
      .references(() => editions.id, { onDelete: "cascade" }),
    plateId: uuid("plate_id")
      .notNull()
      .references(() => plates.id, { onDelete: "restrict" }),
    /** The plate version chosen; a later version does not change what was laid out. */
    plateVersion: integer("plate_version").notNull(),
    /** 1..n within the edition, without gaps. */
    position: integer("position").notNull(),
    slot: text("slot", { enum: EDITION_SLOTS }).notNull().default("single-column"),
    /** Only for the custom slot. */
    customWidthMm: real("custom_width_mm"),
    customDpi: integer("custom_dpi"),
    rendition: text("rendition").$type<Rendition>().notNull(),
    /** Replaces the plate's caption in this edition only; null keeps the plate's. */
    captionOverride: text("caption_override"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("edition_items_edition_plate_key").on(t.editionId, t.plateId), index("edition_items_plate_idx").on(t.plateId), index("edition_items_edition_position_idx").on(t.editionId, t.position)],
);

export type Edition = typeof editions.$inferSelect;
export type EditionItem = typeof editionItems.$inferSelect;

export const EXPORT_STATES = ["queued", "running", "done", "failed"] as const;
export type ExportState = (typeof EXPORT_STATES)[number];

/** What an export bundle holds besides the sRGB TIFF and JPEG of each plate. */
export interface ExportOptions {
  cmyk: boolean;
  greyscale: boolean;
  fileNameTemplate: string;
}

/** One file of a finished bundle, as its metadata JSON lists it. */
export interface ExportFileEntry {
  name: string;
  bytes: number;
}

/**
 * Print bundles of an edition: one row per export the editor started. The
 * worker fills in progress, then the ZIP's key in the exports bucket. An
 * edition whose export finished is marked exported; older bundles stay.
 */
export const editionExports = pgTable(
  "edition_exports",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    editionId: uuid("edition_id")
      .notNull()
      .references(() => editions.id, { onDelete: "cascade" }),
    state: text("state", { enum: EXPORT_STATES }).notNull().default("queued"),
    options: jsonb("options").$type<ExportOptions>().notNull(),
    /** 0..1 and the step being worked on, for the editor's progress bar. */
    progress: real("progress").notNull().default(0),
    stage: text("stage"),
    objectKey: text("object_key"),
    zipName: text("zip_name"),
    bytes: bigint("bytes", { mode: "number" }),
    files: jsonb("files").$type<ExportFileEntry[]>(),
    /** Size notes and other warnings the bundle carries (also in its proof). */
    warnings: jsonb("warnings").$type<string[]>().notNull().default([]),
    error: text("error"),
    requestedBy: text("requested_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [index("edition_exports_edition_idx").on(t.editionId, t.createdAt)],
);

export type EditionExport = typeof editionExports.$inferSelect;
