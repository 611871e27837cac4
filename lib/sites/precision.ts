// What public pages may show of a site: its precision decides. "rounded" snaps
// to a 0.1 degree grid (about 11 km north-south, less east-west away from the
// equator), which is the "about 10 km" the design promises; "hidden" shows no
// position at all.
import type { LocationPrecision } from "@/db/schema";

export const ROUNDING_STEP_DEG = 0.1;

export interface PublicPosition {
  latDeg: number;
  lonDeg: number;
  precision: Exclude<LocationPrecision, "hidden">;
}

export function toPublicPosition(latDeg: number, lonDeg: number, precision: LocationPrecision): PublicPosition | null {
  if (precision === "hidden") return null;
  if (precision === "exact") return { latDeg, lonDeg, precision };
  const snap = (v: number) => Math.round(v / ROUNDING_STEP_DEG) * ROUNDING_STEP_DEG;
  // Keep one decimal so the value itself does not carry more than it should.
  return { latDeg: Number(snap(latDeg).toFixed(1)), lonDeg: Number(snap(lonDeg).toFixed(1)), precision };
}

/** Elevation step for a rounded site: 100 m says no more than the 0.1 degree grid does. */
export const ROUNDING_STEP_M = 100;

export interface ObserverPlace {
  latDeg: number;
  lonDeg: number;
  elevationM: number;
}

/**
 * The observer's place as public files may carry it: exact as it is, rounded to
 * the grid (and elevation to 100 m), or null for a hidden site.
 */
export function toPublicObserver(place: ObserverPlace, precision: LocationPrecision): ObserverPlace | null {
  const pos = toPublicPosition(place.latDeg, place.lonDeg, precision);
  if (!pos) return null;
  if (precision === "exact") return { ...place };
  return { latDeg: pos.latDeg, lonDeg: pos.lonDeg, elevationM: Math.round(place.elevationM / ROUNDING_STEP_M) * ROUNDING_STEP_M };
}

export interface PublicSiteText {
  /** The site's public label; null when it has none or the site is hidden. The private name is never shown. */
  label: string | null;
  /** Null for a hidden site: even the country says too much then. */
  country: string | null;
  position: PublicPosition | null;
}

export function toPublicSite(
  site: { publicLabel: string; latDeg: number; lonDeg: number; precision: LocationPrecision },
  country: string | null,
): PublicSiteText {
  if (site.precision === "hidden") return { label: null, country: null, position: null };
  return { label: site.publicLabel.trim() || null, country, position: toPublicPosition(site.latDeg, site.lonDeg, site.precision) };
}
