// SVG path data for the path of totality on a map projection: the band between
// the limits, the central line and each limit, broken where they cross the
// map's 180-degree edge.
import type { GeoPoint } from "@/lib/astro/central-path";
import type { PathLines } from "@/lib/planner/path";

export type Project = (p: GeoPoint) => [number, number];

/** A line through the points, broken at gaps and where it crosses the map's edge at 180 degrees. */
function polyline(points: (GeoPoint | null)[], project: Project): string {
  let d = "";
  let previous: GeoPoint | null = null;
  for (const p of points) {
    if (!p) {
      previous = null;
      continue;
    }
    const [x, y] = project(p);
    const jump = previous !== null && Math.abs(p.lonDeg - previous.lonDeg) > 180;
    d += `${previous === null || jump ? "M" : "L"}${x.toFixed(1)},${y.toFixed(1)}`;
    previous = p;
  }
  return d;
}

/** The band between the limits as small quadrilaterals (none across the 180-degree edge). */
function band(north: (GeoPoint | null)[], south: (GeoPoint | null)[], project: Project): string {
  let d = "";
  for (let i = 1; i < north.length; i++) {
    const corners = [north[i - 1], north[i], south[i], south[i - 1]];
    if (corners.some((c) => c === null)) continue;
    const lons = (corners as GeoPoint[]).map((c) => c.lonDeg);
    if (Math.max(...lons) - Math.min(...lons) > 180) continue;
    d += (corners as GeoPoint[]).map((c, k) => `${k === 0 ? "M" : "L"}${project(c).map((v) => v.toFixed(1)).join(",")}`).join("") + "Z";
  }
  return d;
}

export function drawPathLines(path: PathLines, project: Project): { band: string; central: string; north: string; south: string } {
  return { band: band(path.north, path.south, project), central: polyline(path.central, project), north: polyline(path.north, project), south: polyline(path.south, project) };
}
