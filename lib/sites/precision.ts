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
