// The eclipse catalogue (computed, not typed), members' sites and kits, and
// saved field plans.
import { sql } from "drizzle-orm";
import { boolean, check, doublePrecision, index, integer, jsonb, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";

export const ECLIPSE_KINDS = ["total", "annular", "hybrid", "partial"] as const;
export type EclipseKind = (typeof ECLIPSE_KINDS)[number];

export const eclipses = pgTable("eclipses", {
  // The date of greatest eclipse, e.g. "2027-08-02": stable and readable in URLs.
  id: text("id").primaryKey(),
  peakAt: timestamp("peak_at", { withTimezone: true }).notNull(),
  kind: text("kind", { enum: ECLIPSE_KINDS }).notNull(),
  peakLatDeg: doublePrecision("peak_lat_deg"),
  peakLonDeg: doublePrecision("peak_lon_deg"),
  /** A name an admin gives, e.g. "The Luxor eclipse". */
  name: text("name"),
  featured: boolean("featured").notNull().default(false),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
});

export const SITE_KINDS = ["fixed", "moving"] as const;
export const LOCATION_PRECISIONS = ["exact", "rounded", "hidden"] as const;
export type LocationPrecision = (typeof LOCATION_PRECISIONS)[number];

export interface TrackPoint {
  timeMs: number;
  latDeg: number;
  lonDeg: number;
  elevationM?: number;
}

export const sites = pgTable(
  "sites",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    ownerId: text("owner_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    // Private: the owner's own name for the place (it may be a street or a car park).
    name: text("name").notNull(),
    // What public pages call the place (a town, a region); empty shows none. Never shown for a hidden site.
    publicLabel: text("public_label").notNull().default(""),
    kind: text("kind", { enum: SITE_KINDS }).notNull(),
    // Fixed sites: the place; moving sites: the first point of the track.
    latDeg: doublePrecision("lat_deg").notNull(),
    lonDeg: doublePrecision("lon_deg").notNull(),
    elevationM: doublePrecision("elevation_m").notNull().default(0),
    precision: text("precision", { enum: LOCATION_PRECISIONS }).notNull().default("rounded"),
    track: jsonb("track").$type<TrackPoint[]>(),
    trackFileName: text("track_file_name"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("sites_owner_idx").on(t.ownerId),
    check("sites_lat_range", sql`${t.latDeg} between -90 and 90`),
    check("sites_lon_range", sql`${t.lonDeg} between -180 and 180`),
  ],
);

export const MOUNTS = ["equatorial", "alt-az", "fixed-tripod", "hand-held", "stabilised"] as const;
export type Mount = (typeof MOUNTS)[number];

export const kits = pgTable(
  "kits",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    ownerId: text("owner_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    camera: text("camera").notNull(),
    sensorWidthMm: doublePrecision("sensor_width_mm").notNull(),
    sensorHeightMm: doublePrecision("sensor_height_mm").notNull(),
    pixelPitchUm: doublePrecision("pixel_pitch_um").notNull(),
    focalMm: doublePrecision("focal_mm").notNull(),
    teleconverter: doublePrecision("teleconverter").notNull().default(1),
    fNumber: doublePrecision("f_number").notNull(),
    mount: text("mount", { enum: MOUNTS }).notNull(),
    flipHorizontal: boolean("flip_horizontal").notNull().default(false),
    flipVertical: boolean("flip_vertical").notNull().default(false),
    notes: text("notes").notNull().default(""),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("kits_owner_idx").on(t.ownerId),
    check("kits_positive_optics", sql`${t.focalMm} > 0 and ${t.pixelPitchUm} > 0 and ${t.fNumber} > 0 and ${t.teleconverter} > 0`),
  ],
);

export const fieldPlans = pgTable(
  "field_plans",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    ownerId: text("owner_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    eclipseId: text("eclipse_id")
      .notNull()
      .references(() => eclipses.id),
    siteId: uuid("site_id").references(() => sites.id, { onDelete: "set null" }),
    latDeg: doublePrecision("lat_deg").notNull(),
    lonDeg: doublePrecision("lon_deg").notNull(),
    elevationM: doublePrecision("elevation_m").notNull().default(0),
    kitId: uuid("kit_id").references(() => kits.id, { onDelete: "set null" }),
    isos: integer("isos").array().notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("field_plans_owner_idx").on(t.ownerId)],
);

export type Eclipse = typeof eclipses.$inferSelect;
export type Site = typeof sites.$inferSelect;
export type Kit = typeof kits.$inferSelect;
export type FieldPlan = typeof fieldPlans.$inferSelect;
