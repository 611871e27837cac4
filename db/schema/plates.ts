// Plates: what the society publishes. A plate pins one reduction of a bracket
// set, or one composite of several reductions, through its versions; replacing
// it makes a new version, and every version keeps its own permanent link. Drafts and withdrawn plates never
// reach public queries; a withdrawn plate keeps its record and says why.
import { sql } from "drizzle-orm";
import { boolean, check, index, integer, jsonb, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { bracketSets } from "./brackets";
import { composites } from "./composites";
import { reductions } from "./reductions";
import { eclipses } from "./sky";

export const PLATE_STATES = ["draft", "published", "withdrawn"] as const;
export type PlateState = (typeof PLATE_STATES)[number];
export const PLATE_LICENCES = ["CC-BY-4.0", "CC-BY-SA-4.0", "CC-BY-NC-4.0", "CC-BY-NC-SA-4.0", "CC0-1.0", "all-rights-reserved"] as const;
export type PlateLicence = (typeof PLATE_LICENCES)[number];
export const WITHDRAWAL_KINDS = ["temporary", "permanent"] as const;
export type WithdrawalKind = (typeof WITHDRAWAL_KINDS)[number];
export const RENDITIONS = ["natural", "structure"] as const;
export type Rendition = (typeof RENDITIONS)[number];

export const plates = pgTable(
  "plates",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    slug: text("slug").notNull(),
    /** The one bracket set a reduction's plate shows; null for a composite's plate, whose sets are its inputs'. */
    bracketSetId: uuid("bracket_set_id").references(() => bracketSets.id, { onDelete: "restrict" }),
    eclipseId: text("eclipse_id")
      .notNull()
      .references(() => eclipses.id),
    state: text("state", { enum: PLATE_STATES }).notNull().default("draft"),
    title: text("title").notNull(),
    caption: text("caption").notNull().default(""),
    description: text("description").notNull().default(""),
    altText: text("alt_text").notNull(),
    /** Who took the frames, and who (a person, or the pipeline and its version) processed them. */
    acquiredBy: text("acquired_by").notNull(),
    processedBy: text("processed_by").notNull(),
    licence: text("licence", { enum: PLATE_LICENCES }).notNull(),
    /** Country of the site, from its position (public even when the position is hidden). */
    siteCountry: text("site_country"),
    featured: boolean("featured").notNull().default(false),
    currentVersion: integer("current_version").notNull().default(1),
    publishedAt: timestamp("published_at", { withTimezone: true }),
    withdrawnAt: timestamp("withdrawn_at", { withTimezone: true }),
    withdrawnReason: text("withdrawn_reason"),
    /** temporary: hidden while a question is looked at; permanent: for good. Null unless withdrawn. */
    withdrawnKind: text("withdrawn_kind", { enum: WITHDRAWAL_KINDS }),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("plates_slug_key").on(t.slug), index("plates_state_published_idx").on(t.state, t.publishedAt), index("plates_eclipse_idx").on(t.eclipseId)],
);

export const plateVersions = pgTable(
  "plate_versions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    plateId: uuid("plate_id")
      .notNull()
      .references(() => plates.id, { onDelete: "cascade" }),
    version: integer("version").notNull(),
    /** What the version shows: one finished reduction or one finished composite, never both. */
    reductionId: uuid("reduction_id").references(() => reductions.id, { onDelete: "restrict" }),
    compositeId: uuid("composite_id").references(() => composites.id, { onDelete: "restrict" }),
    renditions: jsonb("renditions").$type<Rendition[]>().notNull(),
    /** Pixel size of each published rendition's pyramid, read from its info.json at publishing. */
    imageSizes: jsonb("image_sizes").$type<Partial<Record<Rendition, { width: number; height: number }>>>().notNull(),
    /** Sun, Moon, solar north and plate scale in the renditions' pixels, for the viewer's overlays; fields absent when unknown. */
    geometry: jsonb("geometry").$type<PlateGeometry>().notNull(),
    /** Read from the reduction's report at publishing: what the page tells about the data. */
    facts: jsonb("facts").$type<PlateFacts>().notNull(),
    changeNote: text("change_note").notNull().default(""),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("plate_versions_plate_version_key").on(t.plateId, t.version),
    index("plate_versions_reduction_idx").on(t.reductionId),
    index("plate_versions_composite_idx").on(t.compositeId),
    check("plate_versions_one_source", sql`(${t.reductionId} is null) <> (${t.compositeId} is null)`),
  ],
);

export interface PlateGeometry {
  sunCentre?: { x: number; y: number };
  sunRadiusPx?: number;
  moonCentre?: { x: number; y: number };
  moonRadiusPx?: number;
  /** Degrees counter-clockwise from image up. */
  solarNorthAngleDeg?: number;
  plateScaleArcsecPerPx?: number;
}

export interface PlateFacts {
  exposuresS: number[];
  captureStartUtc: string | null;
  captureEndUtc: string | null;
  moonSilhouetteUtc: string | null;
  referenceFrame: string | null;
  dynamicRangeStops: number | null;
  masterSize: { width: number; height: number } | null;
  /** A composite's inputs in its order: each one's exposures and capture span (absent for a reduction). */
  inputs?: Pick<PlateFacts, "exposuresS" | "captureStartUtc" | "captureEndUtc">[];
}

export type Plate = typeof plates.$inferSelect;
export type PlateVersion = typeof plateVersions.$inferSelect;

export const PLATE_REPORT_KINDS = ["rights", "error", "other"] as const;
export type PlateReportKind = (typeof PLATE_REPORT_KINDS)[number];
export const PLATE_REPORT_STATES = ["open", "answered", "closed"] as const;
export type PlateReportState = (typeof PLATE_REPORT_STATES)[number];

/** What visitors tell us about a published plate; curators answer by e-mail and the answer is kept. */
export const plateReports = pgTable(
  "plate_reports",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    plateId: uuid("plate_id")
      .notNull()
      .references(() => plates.id, { onDelete: "cascade" }),
    kind: text("kind", { enum: PLATE_REPORT_KINDS }).notNull(),
    message: text("message").notNull(),
    reporterEmail: text("reporter_email").notNull(),
    state: text("state", { enum: PLATE_REPORT_STATES }).notNull().default("open"),
    answer: text("answer"),
    answeredBy: text("answered_by").references(() => users.id, { onDelete: "set null" }),
    answeredAt: timestamp("answered_at", { withTimezone: true }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("plate_reports_plate_state_idx").on(t.plateId, t.state)],
);
export type PlateReport = typeof plateReports.$inferSelect;
