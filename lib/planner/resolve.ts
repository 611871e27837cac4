// Turns the planner's query (a shareable address) into a plan input: which
// eclipse, where, with what. Saved sites and kits are the actor's own only.
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { MOUNTS } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { findEclipse, findNextCentralEclipse, type EclipseDto } from "@/lib/eclipses/eclipses";
import { AppError } from "@/lib/errors";
import { findKit } from "@/lib/kits/kits";
import { findOwnSite } from "@/lib/sites/sites";
import type { PlanInput } from "./plan";
import { strictNumber } from "@/lib/strict-number";

const optionalNumber = (min: number, max: number, what: string) =>
  z
    .union([z.literal(""), strictNumber(z.number({ error: `expected a number (${what})` }).min(min, { error: `must be at least ${min} (${what})` }).max(max, { error: `must be at most ${max} (${what})` }))])
    .optional()
    .transform((v) => (v === "" || v === undefined ? undefined : v));

export const plannerQuerySchema = z.object({
  eclipse: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { error: "expected an eclipse date like 2027-08-02" }).optional(),
  site: z.union([z.literal(""), z.uuid({ error: "expected a saved site" })]).optional(),
  lat: optionalNumber(-90, 90, "latitude in degrees"),
  lon: optionalNumber(-180, 180, "longitude in degrees"),
  elev: optionalNumber(-500, 9000, "elevation in metres"),
  place: z.string().trim().max(80).optional(),
  kit: z.union([z.literal(""), z.uuid({ error: "expected a saved kit" })]).optional(),
  f: optionalNumber(0.5, 128, "f-number"),
  focal: optionalNumber(1, 20_000, "focal length in mm"),
  mount: z.union([z.literal(""), z.enum(MOUNTS)]).optional(),
  isos: z
    .string()
    .optional()
    .transform((v, ctx) => {
      const list = (v || "100,400").split(/[\s,]+/).filter(Boolean).map(Number);
      if (list.length === 0 || list.length > 6 || list.some((n) => !Number.isInteger(n) || n < 25 || n > 409_600)) {
        ctx.addIssue({ code: "custom", message: "expected one to six ISO speeds between 25 and 409600, separated by commas" });
        return z.NEVER;
      }
      return list;
    }),
  tz: z
    .string()
    .optional()
    .transform((v, ctx) => {
      const zone = v || "UTC";
      try {
        new Intl.DateTimeFormat("en", { timeZone: zone });
      } catch {
        ctx.addIssue({ code: "custom", message: `unknown time zone "${zone}"` });
        return z.NEVER;
      }
      return zone;
    }),
});
export type PlannerQuery = z.infer<typeof plannerQuerySchema>;

export interface ResolvedPlan {
  input: PlanInput;
  eclipse: EclipseDto;
  timeZone: string;
  /** How the site was chosen, for the page to say so. */
  siteSource: "saved" | "typed" | "greatest-eclipse";
  kitSource: "saved" | "typed";
}

export async function resolvePlan(db: DbOrTx, actor: Actor | null, q: PlannerQuery): Promise<ResolvedPlan> {
  const eclipse = q.eclipse ? await findEclipse(db, q.eclipse) : await findNextCentralEclipse(db);
  if (!eclipse) throw new AppError("not_found", "The eclipse catalogue is empty; run the seed.");
  const peakUtcMs = Date.parse(eclipse.peakAt);

  let site: PlanInput["site"];
  let siteSource: ResolvedPlan["siteSource"];
  if (q.site) {
    const row = await findOwnSite(db, actor, q.site);
    if (row.kind === "moving" && row.track) {
      // The planner follows the ship or aircraft along its track (contacts where it is then).
      site = { latDeg: row.latDeg, lonDeg: row.lonDeg, elevationM: row.elevationM, name: row.name, track: row.track };
    } else {
      site = { latDeg: row.latDeg, lonDeg: row.lonDeg, elevationM: row.elevationM, name: row.name };
    }
    siteSource = "saved";
  } else if (q.lat !== undefined && q.lon !== undefined) {
    site = { latDeg: q.lat, lonDeg: q.lon, elevationM: q.elev ?? 0, name: q.place || `${q.lat.toFixed(3)}°, ${q.lon.toFixed(3)}°` };
    siteSource = "typed";
  } else if (eclipse.peakLatDeg !== null && eclipse.peakLonDeg !== null) {
    site = { latDeg: eclipse.peakLatDeg, lonDeg: eclipse.peakLonDeg, elevationM: 0, name: "Point of greatest eclipse" };
    siteSource = "greatest-eclipse";
  } else {
    throw new AppError("invalid_input", "This eclipse has no central line: choose a place.", [{ field: "lat", message: "choose a place" }]);
  }

  let kitSource: ResolvedPlan["kitSource"] = "typed";
  let kit: PlanInput["kit"] = { name: "Lens", fNumber: q.f ?? 8, focalMm: q.focal, mount: q.mount || undefined };
  if (q.kit) {
    const k = await findKit(db, actor, q.kit);
    kit = { ...k, name: k.name };
    kitSource = "saved";
  }
  return { input: { eclipseId: eclipse.id, eclipsePeakUtcMs: peakUtcMs, site, kit, isos: q.isos }, eclipse, timeZone: q.tz, siteSource, kitSource };
}
