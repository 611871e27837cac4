// What the set page and the reduction page check before (and after) a run: the
// kit's plate scale against the one the frames show, the Moon-to-Sun size that
// turns limb radii into solar radii, and where north will come from. Scoped to
// what the actor may see, like the set itself.
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { eclipses, kits, sites } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { findVisibleSet } from "./access";
import { describeOrientation, type OrientationOutlook } from "./orientation";
import { checkKitScale, computeMoonToSun, describeScaleMismatch, type ScaleCheck } from "./scale-check";

export interface SetChecks {
  scale: ScaleCheck | null;
  /** The warning with both numbers, when the kit and the frames differ by more than 10 %. */
  scaleWarning: string | null;
  moonToSun: number | null;
  orientation: OrientationOutlook;
  kitName: string | null;
}

function medianMs(values: number[]): number | null {
  if (values.length === 0) return null;
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[sorted.length >> 1];
}

/**
 * `limbRadiiPx`: sound limb radii of the frames in question (the set's light
 * frames, or a reduction's); `timesMs`: their true capture times, for the
 * ephemeris (the eclipse's greatest instant when none is known; the Moon's size
 * changes by well under 0.1 % over an hour).
 */
export async function checkSetGeometry(db: DbOrTx, actor: Actor | null, setId: string, limbRadiiPx: number[], timesMs: number[]): Promise<SetChecks> {
  const { set } = await findVisibleSet(db, actor, setId);
  const [site] = await db.select({ latDeg: sites.latDeg, lonDeg: sites.lonDeg, elevationM: sites.elevationM }).from(sites).where(eq(sites.id, set.siteId)).limit(1);
  const [kit] = set.kitId
    ? await db.select({ name: kits.name, mount: kits.mount, pixelPitchUm: kits.pixelPitchUm, focalMm: kits.focalMm, teleconverter: kits.teleconverter }).from(kits).where(eq(kits.id, set.kitId)).limit(1)
    : [];
  const [eclipse] = await db.select({ peakAt: eclipses.peakAt }).from(eclipses).where(eq(eclipses.id, set.eclipseId)).limit(1);
  const atMs = medianMs(timesMs) ?? eclipse?.peakAt.getTime() ?? null;
  let scale: ScaleCheck | null = null;
  let moonToSun: number | null = null;
  if (site && atMs !== null) {
    moonToSun = computeMoonToSun(site, atMs).ratio;
    if (kit) scale = checkKitScale(limbRadiiPx, kit, site, atMs);
  }
  return {
    scale,
    scaleWarning: scale?.isOff && kit ? describeScaleMismatch(scale, kit.name) : null,
    moonToSun,
    orientation: describeOrientation(kit ? { name: kit.name, mount: kit.mount } : null, set.northAngleDeg),
    kitName: kit?.name ?? null,
  };
}
