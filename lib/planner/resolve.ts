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
import { SENSOR_FORMAT_KEYS, resolveSensor } from "./sensor-formats";

// Numbers in plain decimal notation only (lib/strict-number.ts): "0x20" is not 32.
const optionalNumber = (min: number, max: number, unit: string) => {
  const expected = `expected a number from ${min} to ${max}${unit ? ` ${unit}` : ""}`;
  return z
    .union([z.literal(""), strictNumber(z.number({ error: expected }).min(min, { error: expected }).max(max, { error: expected }))], { error: expected })
    .optional()
    .transform((v) => (v === "" || v === undefined ? undefined : v));
};

export const plannerQuerySchema = z.object({
  eclipse: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { error: "expected an eclipse date like 2027-08-02" }).optional(),
  site: z.union([z.literal(""), z.uuid()], { error: "expected one of your saved sites" }).optional(),
  lat: optionalNumber(-90, 90, "degrees (north positive)"),
  lon: optionalNumber(-180, 180, "degrees (east positive)"),
  elev: optionalNumber(-500, 9000, "metres"),
  place: z.string().trim().max(80, { error: "expected at most 80 characters" }).optional(),
  kit: z.union([z.literal(""), z.uuid()], { error: "expected one of your saved kits" }).optional(),
  f: optionalNumber(0.5, 128, ""),
  focal: optionalNumber(1, 20_000, "mm"),
  mount: z.union([z.literal(""), z.enum(MOUNTS)], { error: "expected one of the mounts in the list" }).optional(),
  sensor: z.union([z.literal(""), z.literal("custom"), z.enum(SENSOR_FORMAT_KEYS)], { error: "expected one of the sensor formats in the list" }).optional(),
  sw: optionalNumber(1, 100, "mm"),
  sh: optionalNumber(1, 100, "mm"),
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
        ctx.addIssue({ code: "custom", message: "expected a time zone from the list, such as Europe/Madrid" });
        return z.NEVER;
      }
      return zone;
    }),
});
export type PlannerQuery = z.infer<typeof plannerQuerySchema>;

/** What a visitor reads beside each field of the planner's form. */
export const PLANNER_FIELD_LABELS: Record<keyof PlannerQuery, string> = {
  eclipse: "Eclipse",
  site: "One of your sites",
  lat: "Latitude",
  lon: "Longitude",
  elev: "Elevation",
  place: "Place name",
  kit: "One of your kits",
  f: "",
  focal: "Focal length",
  mount: "Mount",
  sensor: "Sensor",
  sw: "Sensor width",
  sh: "Sensor height",
  isos: "ISO speeds",
  tz: "Time zone",
};

export interface PlannerFieldProblem {
  field: keyof PlannerQuery;
  label: string;
  /** A sentence for people: the label, what was expected and what came. */
  message: string;
}

/**
 * The planner's address read field by field, for the page: a bad value is left out (the
 * field falls back to its default) and reported beside its field, so one typo in a shared
 * link never throws the rest of the plan away.
 */
export function parsePlannerQuery(raw: Record<string, string | string[] | undefined>): { query: PlannerQuery; problems: PlannerFieldProblem[] } {
  const shape = plannerQuerySchema.shape;
  const clean: Record<string, string> = {};
  const problems: PlannerFieldProblem[] = [];
  for (const key of Object.keys(shape) as (keyof PlannerQuery)[]) {
    const value = raw[key];
    // A key given twice (?lat=1&lat=2): the first one counts.
    const text = Array.isArray(value) ? value[0] : value;
    if (text === undefined) continue;
    const one = shape[key].safeParse(text);
    if (one.success) {
      clean[key] = text;
    } else {
      const shown = text.length > 40 ? `${text.slice(0, 40)}…` : text;
      const expected = one.error.issues[0]?.message ?? "a different value";
      problems.push({ field: key, label: PLANNER_FIELD_LABELS[key], message: `${PLANNER_FIELD_LABELS[key]}: ${expected}; the address gave “${shown}”.` });
    }
  }
  const query = plannerQuerySchema.parse(clean);
  // One typed size without the other draws nothing: say which one is missing.
  if ((query.sw === undefined) !== (query.sh === undefined)) {
    const missing = query.sw === undefined ? "sw" : "sh";
    problems.push({ field: missing, label: PLANNER_FIELD_LABELS[missing], message: `${PLANNER_FIELD_LABELS[missing]}: needed as well when the other size is typed.` });
  }
  return { query, problems };
}

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
  const sensor = resolveSensor(q);
  let kit: PlanInput["kit"] = {
    name: "Lens",
    fNumber: q.f ?? 8,
    focalMm: q.focal,
    mount: q.mount || undefined,
    sensorWidthMm: sensor?.widthMm,
    sensorHeightMm: sensor?.heightMm,
  };
  if (q.kit) {
    const k = await findKit(db, actor, q.kit);
    kit = { ...k, name: k.name };
    kitSource = "saved";
  }
  return { input: { eclipseId: eclipse.id, eclipsePeakUtcMs: peakUtcMs, site, kit, isos: q.isos }, eclipse, timeZone: q.tz, siteSource, kitSource };
}
