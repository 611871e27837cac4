// Members' observing sites: fixed places, or moving ones (a ship, an aircraft)
// described by a time-stamped track. A member sees and changes only their own.
import { and, eq, sql } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { LOCATION_PRECISIONS, sites, type Site, type TrackPoint } from "@/db/schema";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { findOwnRow, listOwnRows } from "@/lib/auth/own-rows";
import { AppError } from "@/lib/errors";
import { MAX_TRACK_CHARS, MAX_TRACK_LABEL } from "./limits";
import { forgetPublicAccess } from "@/lib/reductions/files/serve";
import { strictNumber } from "@/lib/strict-number";
import { parseTrackText } from "./track-file";

// Degrees in plain decimal notation only: "0x20" is refused, not read as 32.
const coord = (what: string, limit: number) =>
  strictNumber(
    z
      .number({ error: `expected a number of degrees in decimal notation (${what})` })
      .min(-limit, { error: `must be between -${limit} and ${limit} degrees` })
      .max(limit, { error: `must be between -${limit} and ${limit} degrees` }),
  );

const common = {
  name: z.string().trim().min(2, { error: "needs at least 2 characters" }).max(80),
  // What public pages call the place; the name above stays private.
  publicLabel: z
    .string()
    .trim()
    .max(80, { error: "must be at most 80 characters" })
    .refine((v) => !/[\u0000-\u001f\u007f]/.test(v), { error: "must not hold control characters" })
    .optional()
    .default(""),
  precision: z.enum(LOCATION_PRECISIONS, { error: `expected one of ${LOCATION_PRECISIONS.join(", ")}` }).default("rounded"),
};

export const fixedSiteSchema = z.object({
  ...common,
  kind: z.literal("fixed"),
  latDeg: coord("latitude", 90),
  lonDeg: coord("longitude", 180),
  elevationM: strictNumber(z.number({ error: "expected metres in decimal notation" }).min(-500, { error: "must be at least -500 m" }).max(9000, { error: "must be at most 9000 m" }).default(0)),
});

export const movingSiteSchema = z.object({
  ...common,
  kind: z.literal("moving"),
  trackFileName: z.string().trim().min(1, { error: "choose a GPX or CSV file" }).max(200),
  trackText: z
    .string()
    .min(1, { error: "the track file is empty" })
    .max(MAX_TRACK_CHARS, { error: `the track file is larger than ${MAX_TRACK_LABEL}, the most a track file may have` }),
});

export const siteInputSchema = z.discriminatedUnion("kind", [fixedSiteSchema, movingSiteSchema], { error: "expected kind fixed or moving" });
export type SiteInput = z.infer<typeof siteInputSchema>;

/** Editing a site: a moving site keeps its track unless a new file is given. */
export const siteEditSchema = z.discriminatedUnion(
  "kind",
  [
    fixedSiteSchema.extend({ id: z.uuid({ error: "expected a site id" }) }),
    movingSiteSchema.extend({
      id: z.uuid({ error: "expected a site id" }),
      trackFileName: z.string().trim().max(200).optional(),
      trackText: z.string().max(20_000_000, { error: "the track file is larger than 20 MB" }).optional(),
    }),
  ],
  { error: "expected kind fixed or moving" },
);
export type SiteEdit = z.infer<typeof siteEditSchema>;
/** What an edit changes: a site's fields, where a moving site's track may be left out. */
export type SiteChange = SiteEdit extends infer E ? (E extends SiteEdit ? Omit<E, "id"> : never) : never;

export interface SiteDto {
  id: string;
  name: string;
  publicLabel: string;
  kind: Site["kind"];
  latDeg: number;
  lonDeg: number;
  elevationM: number;
  precision: Site["precision"];
  trackFileName: string | null;
  trackPoints: number;
  trackStart: string | null;
  trackEnd: string | null;
}

function toDto(s: Site): SiteDto {
  const track = s.track ?? [];
  return {
    id: s.id,
    name: s.name,
    publicLabel: s.publicLabel,
    kind: s.kind,
    latDeg: s.latDeg,
    lonDeg: s.lonDeg,
    elevationM: s.elevationM,
    precision: s.precision,
    trackFileName: s.trackFileName,
    trackPoints: track.length,
    trackStart: track.length ? new Date(track[0].timeMs).toISOString() : null,
    trackEnd: track.length ? new Date(track[track.length - 1].timeMs).toISOString() : null,
  };
}

/** The values to store for an input; a moving site's track is parsed and checked here. */
function toRow(input: SiteInput): Omit<typeof sites.$inferInsert, "ownerId"> {
  if (input.kind === "fixed") {
    return { name: input.name, publicLabel: input.publicLabel, kind: "fixed", precision: input.precision, latDeg: input.latDeg, lonDeg: input.lonDeg, elevationM: input.elevationM, track: null, trackFileName: null };
  }
  let track: TrackPoint[];
  try {
    track = parseTrackText(input.trackText, input.trackFileName);
  } catch (err) {
    throw new AppError("invalid_input", (err as Error).message, [{ field: "trackText", message: (err as Error).message }]);
  }
  const first = track[0];
  return {
    name: input.name,
    publicLabel: input.publicLabel,
    kind: "moving",
    precision: input.precision,
    latDeg: first.latDeg,
    lonDeg: first.lonDeg,
    elevationM: first.elevationM ?? 0,
    track,
    trackFileName: input.trackFileName,
  };
}

export async function listSites(db: DbOrTx, actor: Actor | null): Promise<SiteDto[]> {
  return (await listOwnRows(db, actor, sites)).map(toDto);
}

/** The full row, track included, for the owner's own use (planner, reductions). */
export async function findOwnSite(db: DbOrTx, actor: Actor | null, id: string): Promise<Site> {
  return findOwnRow(db, actor, sites, id, "That site");
}

export async function findSite(db: DbOrTx, actor: Actor | null, id: string): Promise<SiteDto> {
  return toDto(await findOwnSite(db, actor, id));
}

export async function createSite(db: DbOrTx, actor: Actor | null, input: SiteInput): Promise<SiteDto> {
  const a = requirePermission(actor, "studio:use");
  const [row] = await db.insert(sites).values({ ...toRow(input), ownerId: a.userId }).returning();
  return toDto(row);
}

export async function updateSite(db: DbOrTx, actor: Actor | null, id: string, input: SiteInput | SiteChange): Promise<SiteDto> {
  const a = requirePermission(actor, "studio:use");
  const current = await findOwnSite(db, a, id);
  let values: Partial<typeof sites.$inferInsert>;
  if (input.kind === "moving" && !input.trackText) {
    // No new track: a moving site keeps the one it has; a fixed site needs one to become moving.
    if (current.kind !== "moving" || !current.track) {
      throw new AppError("invalid_input", "A moving site needs its track: choose a GPX or CSV file.", [{ field: "trackText", message: "choose a GPX or CSV file" }]);
    }
    values = { name: input.name, publicLabel: input.publicLabel, precision: input.precision };
  } else {
    values = toRow(input as SiteInput);
  }
  const [row] = await db
    .update(sites)
    .set({ ...values, updatedAt: sql`now()` })
    .where(and(eq(sites.id, id), eq(sites.ownerId, a.userId)))
    .returning();
  // A changed precision reaches the public master.fits at once in this process.
  forgetPublicAccess();
  return toDto(row);
}

export async function deleteSite(db: DbOrTx, actor: Actor | null, id: string): Promise<void> {
  const a = requirePermission(actor, "studio:use");
  await findOwnSite(db, a, id);
  await db.delete(sites).where(and(eq(sites.id, id), eq(sites.ownerId, a.userId)));
}
