// Where a moving site was at an instant: linear interpolation between the two
// track points around it. Over the seconds to minutes between fixes a great
// circle and a straight line in latitude and longitude differ by metres, far
// below what changes contact times. Longitude is interpolated along the short
// way, so a track across the 180th meridian does not sweep round the globe.
import { AstroError, requireFinite } from "./errors";
import { SiteLocation } from "./site-time";
import { TrackPoint } from "./track-parse";

/**
 * Instants this close outside the track take its end point: a camera's first frame a
 * moment before the logger's first fix should not fail. A ship at 10 m/s moves 100 m in
 * that time; an aircraft at 250 m/s 2.5 km, so callers with aircraft may pass 0.
 */
export const DEFAULT_TRACK_CLAMP_S = 10;

function wrapLonDeg(lonDeg: number): number {
  let l = ((lonDeg + 180) % 360 + 360) % 360 - 180;
  if (l === -180 && lonDeg > 0) l = 180;
  return l;
}

/** Position on the track at the instant; refuses instants further than clampS outside it. */
export function interpolateTrack(points: readonly TrackPoint[], utcMs: number, clampS = DEFAULT_TRACK_CLAMP_S): SiteLocation {
  requireFinite("utcMs", utcMs);
  requireFinite("clampS", clampS, 0, 3600);
  if (!Array.isArray(points) || points.length === 0) {
    throw new AstroError("bad-parameter", "the track has no points", "track");
  }
  const first = points[0];
  const last = points[points.length - 1];
  const clampMs = clampS * 1000;
  const at = (p: TrackPoint): SiteLocation => ({ latDeg: p.latDeg, lonDeg: p.lonDeg, elevationM: p.elevationM ?? 0 });
  if (utcMs < first.timeMs || utcMs > last.timeMs) {
    if (utcMs >= first.timeMs - clampMs && utcMs < first.timeMs) return at(first);
    if (utcMs <= last.timeMs + clampMs && utcMs > last.timeMs) return at(last);
    throw new AstroError(
      "out-of-range",
      `${new Date(utcMs).toISOString()} is outside the track, which runs from ${new Date(first.timeMs).toISOString()} to ${new Date(last.timeMs).toISOString()}`,
      "utcMs",
    );
  }
  // Binary search for the segment [lo, lo + 1] holding the instant.
  let lo = 0;
  let hi = points.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (points[mid].timeMs <= utcMs) lo = mid;
    else hi = mid;
  }
  const a = points[lo];
  const b = points[hi];
  const span = b.timeMs - a.timeMs;
  const w = span > 0 ? (utcMs - a.timeMs) / span : 0;
  let dLon = b.lonDeg - a.lonDeg;
  if (dLon > 180) dLon -= 360;
  if (dLon < -180) dLon += 360;
  const eleA = a.elevationM ?? 0;
  const eleB = b.elevationM ?? 0;
  return {
    latDeg: a.latDeg + w * (b.latDeg - a.latDeg),
    lonDeg: wrapLonDeg(a.lonDeg + w * dLon),
    elevationM: eleA + w * (eleB - eleA),
  };
}
