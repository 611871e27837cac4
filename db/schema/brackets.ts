// Bracket sets and their frames, and the multipart uploads that bring the
// originals into S3. An original's key is fixed when its upload starts and never
// changes; processing fills in the frame row around it.
import { sql } from "drizzle-orm";
import { bigint, boolean, check, doublePrecision, index, integer, jsonb, pgTable, real, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { BRACKET_SET_STATES } from "./review-states";
import { eclipses, kits, sites } from "./sky";

export { BRACKET_SET_STATES, type BracketSetState } from "./review-states";

export const bracketSets = pgTable(
  "bracket_sets",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    ownerId: text("owner_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    eclipseId: text("eclipse_id")
      .notNull()
      .references(() => eclipses.id),
    siteId: uuid("site_id")
      .notNull()
      .references(() => sites.id),
    kitId: uuid("kit_id").references(() => kits.id, { onDelete: "set null" }),
    name: text("name").notNull(),
    notes: text("notes").notNull().default(""),
    // Seconds the camera clock ran ahead of UTC (negative: behind); true time = clock - offset.
    clockOffsetS: real("clock_offset_s").notNull().default(0),
    // Position angle of celestial north in the image (degrees counter-clockwise from up, after flips), when the photographer knows it; wins over the kit's mount.
    northAngleDeg: real("north_angle_deg"),
    state: text("state", { enum: BRACKET_SET_STATES }).notNull().default("gathering"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("bracket_sets_owner_idx").on(t.ownerId), index("bracket_sets_eclipse_idx").on(t.eclipseId)],
);

export const FRAME_KINDS = ["light", "dark", "flat", "bias"] as const;
export type FrameKind = (typeof FRAME_KINDS)[number];
export const INGEST_STATES = ["received", "ingested", "refused"] as const;
export type IngestState = (typeof INGEST_STATES)[number];
export const EXPOSURE_SOURCES = ["file", "photographer"] as const;
export type ExposureSource = (typeof EXPOSURE_SOURCES)[number];
/** How the photographer gave a frame's capture time: a CSV by file name, a first time and an interval, or typed in the table. */
export const GIVEN_TIME_SOURCES = ["csv", "interval", "table"] as const;
export type GivenTimeSource = (typeof GIVEN_TIME_SOURCES)[number];

/** Automatic findings of ingest; more keys join as triage grows. */
export interface FrameFlags {
  /** Colour planes of the decoded image (1 grey, 3 colour); calibration frames must match the lights'. */
  planeCount?: number;
  /** Fraction of pixels at or above 0.92 of the white level in any plane. */
  clippedFraction?: number;
  /** The file gave no time zone, so its clock was taken to read UTC. */
  isTimeZoneAssumed?: boolean;
  /**
   * The exposure the file gave, when it lay outside the plausible range
   * (lib/media/exposure.ts): it is not used, and the photographer gives one.
   */
  implausibleExposureS?: number;
  /** Set on a refused duplicate: the frame that holds the same bytes. */
  duplicateOfFrameId?: string;
  /** 64 pixel counts of the luminance, bins of equal width from 0 to the white level. */
  histogram?: number[];
  /**
   * Sharpness of the frame (higher is sharper; lib/bracket-sets/frame-analysis.ts says how it is
   * measured). isBlurred is decided on reading, against the set's other light frames.
   */
  sharpness?: number;
  isBlurred?: boolean;
  /**
   * The limb fitted at ingest, in the original's pixels (x right, y down). When
   * quality is "failed" the numbers are whatever the fit reached (0 if none) and mean nothing.
   */
  limb?: { cx: number; cy: number; radiusPx: number; rmsPx: number; quality: "good" | "doubtful" | "failed" };
  /**
   * The frame's well-exposed reach: radii about the fitted limb centre, in units of the
   * limb radius, where the ring's median luminance is above the frame's noise floor and
   * below its clip level (lib/bracket-sets/frame-reach.ts). Null ends: none such ring.
   */
  reach?: { fromR: number | null; toR: number | null; edgeR: number; clippedToR: number | null };
}

export const frames = pgTable(
  "frames",
  {
    id: uuid("id").primaryKey(),
    bracketSetId: uuid("bracket_set_id")
      .notNull()
      .references(() => bracketSets.id, { onDelete: "cascade" }),
    originalKey: text("original_key").notNull(),
    originalFileName: text("original_file_name").notNull(),
    sizeBytes: bigint("size_bytes", { mode: "number" }).notNull(),
    // Null until ingest has read the whole original; a refused duplicate keeps none.
    sha256: text("sha256"),
    format: text("format"),
    width: integer("width"),
    height: integer("height"),
    bitDepth: integer("bit_depth"),
    // Null means "ask the photographer": an exposure is never guessed.
    exposureS: doublePrecision("exposure_s"),
    exposureSource: text("exposure_source", { enum: EXPOSURE_SOURCES }),
    fNumber: doublePrecision("f_number"),
    iso: doublePrecision("iso"),
    // As the camera clock read, converted to UTC; the set's clock offset is applied on reading.
    captureAt: timestamp("capture_at", { withTimezone: true, precision: 3 }),
    // A capture time the photographer gave (camera clock, like captureAt); wins over the file's. The file's stays as read.
    givenCaptureAt: timestamp("given_capture_at", { withTimezone: true, precision: 3 }),
    givenCaptureSource: text("given_capture_source", { enum: GIVEN_TIME_SOURCES }),
    make: text("make"),
    model: text("model"),
    kind: text("kind", { enum: FRAME_KINDS }).notNull().default("light"),
    included: boolean("included").notNull().default(true),
    // Which bracket of the upload the frame belongs to (1, 2, ...), when one upload held several.
    groupNumber: integer("group_number").notNull().default(1),
    ingestState: text("ingest_state", { enum: INGEST_STATES }).notNull().default("received"),
    refusalReason: text("refusal_reason"),
    thumbnailKey: text("thumbnail_key"),
    flags: jsonb("flags").$type<FrameFlags>().notNull().default({}),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("frames_bracket_set_idx").on(t.bracketSetId),
    // The same bytes twice in one set are detected, never stored as two frames; a refused
    // frame holds no claim on its bytes, so the same file can come again (renamed, say).
    uniqueIndex("frames_bracket_set_sha256_key").on(t.bracketSetId, t.sha256).where(sql`${t.ingestState} <> 'refused'`),
    check("frames_positive_exposure", sql`${t.exposureS} is null or ${t.exposureS} > 0`),
    check("frames_group_number_positive", sql`${t.groupNumber} >= 1`),
    check("frames_given_capture_source", sql`(${t.givenCaptureAt} is null) = (${t.givenCaptureSource} is null)`),
  ],
);

export const UPLOAD_STATES = ["open", "completed", "aborted", "expired"] as const;
export type UploadState = (typeof UPLOAD_STATES)[number];

export const uploads = pgTable(
  "uploads",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    bracketSetId: uuid("bracket_set_id")
      .notNull()
      .references(() => bracketSets.id, { onDelete: "cascade" }),
    // The frame this upload becomes; its id is in the key, so it is chosen up front.
    frameId: uuid("frame_id").notNull(),
    s3UploadId: text("s3_upload_id").notNull(),
    key: text("key").notNull(),
    fileName: text("file_name").notNull(),
    sizeBytes: bigint("size_bytes", { mode: "number" }).notNull(),
    partSizeBytes: integer("part_size_bytes").notNull(),
    state: text("state", { enum: UPLOAD_STATES }).notNull().default("open"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("uploads_bracket_set_idx").on(t.bracketSetId), index("uploads_state_created_idx").on(t.state, t.createdAt)],
);

export type BracketSet = typeof bracketSets.$inferSelect;
export type Frame = typeof frames.$inferSelect;
export type Upload = typeof uploads.$inferSelect;
