// The path of totality (or annularity) for the planner: computed from the
// ephemeris once per eclipse and kept in memory, drawn on the map, and used to
// tell a visitor outside it how far the nearest point of totality is.
import { computeBearingDeg, computeCentralPath, describeBearing, findNearestPathPoint, moveAlong, type CentralPath, type GeoPoint } from "@/lib/astro/central-path";

export interface PathLines {
  /** The eclipse's kind along the path, for the legend. */
  kind: "total" | "annular" | "hybrid";
  central: GeoPoint[];
  /** Each limit as one line; a null breaks the line where a limit could not be traced. */
  north: (GeoPoint | null)[];
  south: (GeoPoint | null)[];
}

export interface TotalityReach {
  /** Rounded for people: below 10 km to the km, then to 5 km, then to 10 km. */
  distanceKm: number;
  direction: string;
  bearingDeg: number;
  point: GeoPoint;
  /** A place 10 km past the edge, inside the path: somewhere to plan for instead. */
  inside: GeoPoint;
}

/** How far past the nearest edge the suggested place lies, km. */
const INSIDE_MARGIN_KM = 10;

const MAX_CACHED = 16;
const cache = new Map<string, CentralPath | null>();

/** The eclipse's path, computed on first use (about 0.2 s) and then remembered; null for a partial eclipse. */
export function findCentralPath(eclipse: { id: string; peakAt: string }): CentralPath | null {
  const key = `${eclipse.id}|${eclipse.peakAt}`;
  if (cache.has(key)) return cache.get(key)!;
  const path = computeCentralPath(Date.parse(eclipse.peakAt));
  if (cache.size >= MAX_CACHED) cache.delete(cache.keys().next().value!);
  cache.set(key, path);
  return path;
}

const round = (v: number, places = 3) => Number(v.toFixed(places));
const roundPoint = (p: GeoPoint): GeoPoint => ({ latDeg: round(p.latDeg), lonDeg: round(p.lonDeg) });

/** The lines the map draws, rounded to about 100 m (plenty at any map scale we show). */
export function describePathLines(path: CentralPath, kind: "total" | "annular" | "hybrid"): PathLines {
  return {
    kind,
    central: path.samples.map((s) => roundPoint(s.central)),
    north: path.samples.map((s) => (s.north ? roundPoint(s.north) : null)),
    south: path.samples.map((s) => (s.south ? roundPoint(s.south) : null)),
  };
}

export function roundDistanceKm(km: number): number {
  if (km < 10) return Math.max(1, Math.round(km));
  if (km < 100) return Math.round(km / 5) * 5;
  return Math.round(km / 10) * 10;
}

/** How far and which way the nearest place inside the path lies from a site; null when the path has no traced limits. */
export function findTotalityReach(path: CentralPath, site: GeoPoint): TotalityReach | null {
  const near = findNearestPathPoint(path, site);
  if (!near) return null;
  // Onward along the same great circle: the bearing at the edge point, seen from the site.
  const onward = (computeBearingDeg(near.point, site) + 180) % 360;
  return {
    distanceKm: roundDistanceKm(near.distanceKm),
    direction: describeBearing(near.bearingDeg),
    bearingDeg: near.bearingDeg,
    point: near.point,
    inside: moveAlong(near.point, onward, INSIDE_MARGIN_KM),
  };
}
