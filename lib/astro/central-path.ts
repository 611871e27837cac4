// The path of a central eclipse on the Earth: the central line and the northern
// and southern limits, computed from the ephemeris (never typed in).
//
// Geometry: the Sun and the Moon are spheres (the Sun's radius from 959.63
// arcsec at 1 au, the Moon's from the umbral ratio k = 0.272281 used for second
// and third contact), the Earth is the WGS 84 ellipsoid, and a ground point
// sees totality (or annularity) while its distance rho from the shadow axis is
// smaller than the radius of the umbral (or antumbral) cone at its place along
// the axis:
//   r(lambda) = R_moon / cos f - lambda tan f,   sin f = (R_sun - R_moon) / D,
// lambda the distance behind the Moon's centre, D the Sun-Moon distance.
// Positive r is total, negative annular. This is the same condition that
// local-circumstances.ts refines contacts with (separation below the
// difference of the semi-diameters), so a point just inside a limit computed
// here has a second contact there, and a point just outside has none.
//
// The central line at an instant is where the axis meets the ellipsoid. A limit
// point at that instant is found along the great circle through the central
// point square to the path: the distance s at which the least of rho - |r| over
// time (the closest the cone's edge comes to that ground point) crosses zero.
// Ground points are at height 0 on the ellipsoid.
//
// astronomy-engine is called only on a one-minute grid around the eclipse;
// between grid points the Sun, the Moon and the sidereal angle are interpolated
// with four-point Lagrange polynomials (the error is far below a metre).
import { AstroTime, Body, C_AUDAY, GeoMoon, GeoVector, KM_PER_AU, RotateVector, Rotation_EQJ_EQD, SiderealTime } from "astronomy-engine";
import { AstroError } from "./errors";
import { EARTH_EQUATORIAL_RADIUS_KM, MOON_K_UMBRAL, SUN_SEMI_DIAMETER_1AU_ARCSEC } from "./positions";
import { findMinimumByGoldenSection } from "./search";
import { makeAstroTime, validateUtcMs } from "./site-time";

const DEG = Math.PI / 180;
const ARCSEC_PER_RAD = 206_264.80624709636;
/** WGS 84 flattening and first eccentricity squared. */
const FLATTENING = 1 / 298.257223563;
const E2 = FLATTENING * (2 - FLATTENING);
/** Mean Earth radius (IUGG), km: for distances and bearings on the map, not for the shadow geometry. */
export const EARTH_MEAN_RADIUS_KM = 6371.0088;
const MOON_RADIUS_KM = MOON_K_UMBRAL * EARTH_EQUATORIAL_RADIUS_KM;
const SUN_RADIUS_KM = (SUN_SEMI_DIAMETER_1AU_ARCSEC / ARCSEC_PER_RAD) * KM_PER_AU;
const GRID_STEP_MS = 60_000;
/** The shadow axis crosses the Earth in at most about 3.5 hours; 5 hours either side holds both ends. */
const AXIS_HALF_WINDOW_MS = 5 * 3_600_000;
/** How long before and after the instant of a central point the cone may pass a nearby ground point. */
const PASSAGE_HALF_WINDOW_MS = 10 * 60_000;
/** A limit lies at most this far from the central line (near the terminator the path widens a lot). */
const MAX_HALF_WIDTH_KM = 4000;

export interface GeoPoint {
  latDeg: number;
  lonDeg: number;
}

export interface CentralPathSample {
  utcMs: number;
  central: GeoPoint;
  /** Null where the limit could not be found (the cone's edge runs off the sunlit Earth). */
  north: GeoPoint | null;
  south: GeoPoint | null;
  /** Distance between the two limits, km; null when either is missing. */
  widthKm: number | null;
  /** Umbral radius at the central point, km: positive where the eclipse is total there, negative where annular. */
  umbraRadiusKm: number;
}

export interface CentralPath {
  /** When the shadow axis first and last touches the Earth. */
  startUtcMs: number;
  endUtcMs: number;
  samples: CentralPathSample[];
}

type Vec3 = [number, number, number];

const dot = (a: Vec3, b: Vec3) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
const sub = (a: Vec3, b: Vec3): Vec3 => [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
const norm = (a: Vec3) => Math.hypot(a[0], a[1], a[2]);

/** Earth-fixed (ECEF) position of a point on the WGS 84 ellipsoid, km. */
export function computeEarthFixedKm(p: GeoPoint, heightKm = 0): Vec3 {
  const phi = p.latDeg * DEG;
  const lam = p.lonDeg * DEG;
  const n = EARTH_EQUATORIAL_RADIUS_KM / Math.sqrt(1 - E2 * Math.sin(phi) ** 2);
  return [(n + heightKm) * Math.cos(phi) * Math.cos(lam), (n + heightKm) * Math.cos(phi) * Math.sin(lam), (n * (1 - E2) + heightKm) * Math.sin(phi)];
}

/** Geodetic latitude and longitude of an Earth-fixed point near the surface (iterated to well below a metre). */
function toGeodetic(v: Vec3): GeoPoint {
  const p = Math.hypot(v[0], v[1]);
  let phi = Math.atan2(v[2], p * (1 - E2));
  for (let i = 0; i < 5; i++) {
    const n = EARTH_EQUATORIAL_RADIUS_KM / Math.sqrt(1 - E2 * Math.sin(phi) ** 2);
    phi = Math.atan2(v[2] + E2 * n * Math.sin(phi), p);
  }
  return { latDeg: phi / DEG, lonDeg: Math.atan2(v[1], v[0]) / DEG };
}

/** Straight-line distance between two ground points, km: within 10 m of the surface distance below 400 km. */
export function computeChordKm(a: GeoPoint, b: GeoPoint): number {
  return norm(sub(computeEarthFixedKm(a), computeEarthFixedKm(b)));
}

/** Great-circle distance on the mean sphere, km (haversine). */
export function computeSurfaceDistanceKm(a: GeoPoint, b: GeoPoint): number {
  const dPhi = (b.latDeg - a.latDeg) * DEG;
  const dLam = (b.lonDeg - a.lonDeg) * DEG;
  const h = Math.sin(dPhi / 2) ** 2 + Math.cos(a.latDeg * DEG) * Math.cos(b.latDeg * DEG) * Math.sin(dLam / 2) ** 2;
  return 2 * EARTH_MEAN_RADIUS_KM * Math.asin(Math.min(1, Math.sqrt(h)));
}

/** Initial bearing from a to b on the sphere, degrees from north through east. */
export function computeBearingDeg(a: GeoPoint, b: GeoPoint): number {
  const phi1 = a.latDeg * DEG;
  const phi2 = b.latDeg * DEG;
  const dLam = (b.lonDeg - a.lonDeg) * DEG;
  const y = Math.sin(dLam) * Math.cos(phi2);
  const x = Math.cos(phi1) * Math.sin(phi2) - Math.sin(phi1) * Math.cos(phi2) * Math.cos(dLam);
  return ((Math.atan2(y, x) / DEG) % 360 + 360) % 360;
}

/** The point s km from a along the great circle leaving at the bearing (mean sphere). */
export function moveAlong(a: GeoPoint, bearingDeg: number, distanceKm: number): GeoPoint {
  const d = distanceKm / EARTH_MEAN_RADIUS_KM;
  const phi1 = a.latDeg * DEG;
  const theta = bearingDeg * DEG;
  const phi2 = Math.asin(Math.sin(phi1) * Math.cos(d) + Math.cos(phi1) * Math.sin(d) * Math.cos(theta));
  const lam2 = a.lonDeg * DEG + Math.atan2(Math.sin(theta) * Math.sin(d) * Math.cos(phi1), Math.cos(d) - Math.sin(phi1) * Math.sin(phi2));
  return { latDeg: phi2 / DEG, lonDeg: ((((lam2 / DEG + 180) % 360) + 360) % 360) - 180 };
}

/** Sun and Moon (geocentric, true equator of date, km) and the sidereal angle, tabulated each minute. */
class EphemerisTable {
  private readonly values: number[][] = [];
  constructor(
    private readonly startMs: number,
    count: number,
  ) {
    let previousTheta: number | null = null;
    for (let i = 0; i < count; i++) {
      const time: AstroTime = makeAstroTime(startMs + i * GRID_STEP_MS);
      const rot = Rotation_EQJ_EQD(time);
      const sun = RotateVector(rot, GeoVector(Body.Sun, time, true));
      // The Moon as seen: at t minus the light time (about 1.3 s), as positions.ts takes it.
      const moonNow = GeoMoon(time);
      const moon = RotateVector(rot, GeoMoon(time.AddDays(-Math.hypot(moonNow.x, moonNow.y, moonNow.z) / C_AUDAY)));
      // Greenwich apparent sidereal angle, unwrapped so that it interpolates smoothly.
      let theta = SiderealTime(time) * 15 * DEG;
      if (previousTheta !== null) while (theta < previousTheta) theta += 2 * Math.PI;
      previousTheta = theta;
      this.values.push([sun.x * KM_PER_AU, sun.y * KM_PER_AU, sun.z * KM_PER_AU, moon.x * KM_PER_AU, moon.y * KM_PER_AU, moon.z * KM_PER_AU, theta]);
    }
  }

  get endMs(): number {
    return this.startMs + (this.values.length - 1) * GRID_STEP_MS;
  }

  /** Four-point Lagrange interpolation of every column at an instant inside the table. */
  at(utcMs: number): { sun: Vec3; moon: Vec3; thetaRad: number } {
    const x = (utcMs - this.startMs) / GRID_STEP_MS;
    const i0 = Math.min(Math.max(Math.floor(x) - 1, 0), this.values.length - 4);
    const u = x - i0;
    const w = [-((u - 1) * (u - 2) * (u - 3)) / 6, (u * (u - 2) * (u - 3)) / 2, -(u * (u - 1) * (u - 3)) / 2, (u * (u - 1) * (u - 2)) / 6];
    const out = [0, 0, 0, 0, 0, 0, 0];
    for (let k = 0; k < 4; k++) {
      const row = this.values[i0 + k];
      for (let c = 0; c < 7; c++) out[c] += w[k] * row[c];
    }
    return { sun: [out[0], out[1], out[2]], moon: [out[3], out[4], out[5]], thetaRad: out[6] };
  }
}

interface Shadow {
  moon: Vec3;
  /** Unit vector along the axis, from the Moon away from the Sun. */
  axis: Vec3;
  sun: Vec3;
  tanF: number;
  radiusAtMoonKm: number;
  thetaRad: number;
}

function shadowAt(table: EphemerisTable, utcMs: number): Shadow {
  const { sun, moon, thetaRad } = table.at(utcMs);
  const sm = sub(moon, sun);
  const dKm = norm(sm);
  const sinF = (SUN_RADIUS_KM - MOON_RADIUS_KM) / dKm;
  const cosF = Math.sqrt(1 - sinF * sinF);
  return { moon, sun, axis: [sm[0] / dKm, sm[1] / dKm, sm[2] / dKm], tanF: sinF / cosF, radiusAtMoonKm: MOON_RADIUS_KM / cosF, thetaRad };
}

/** Earth-fixed to the true equator of date: a turn by the sidereal angle about the pole. */
function toInertial(v: Vec3, thetaRad: number): Vec3 {
  const c = Math.cos(thetaRad);
  const s = Math.sin(thetaRad);
  return [v[0] * c - v[1] * s, v[0] * s + v[1] * c, v[2]];
}

function toEarthFixed(v: Vec3, thetaRad: number): Vec3 {
  return toInertial(v, -thetaRad);
}

/** Where the shadow axis meets the ellipsoid (the sunward side) and the cone's radius there; null on a miss. */
function intersectAxis(s: Shadow): { point: GeoPoint; umbraRadiusKm: number } | null {
  // Stretch z so that the ellipsoid becomes a sphere of the equatorial radius.
  const k = 1 / (1 - FLATTENING);
  const m: Vec3 = [s.moon[0], s.moon[1], s.moon[2] * k];
  const d: Vec3 = [s.axis[0], s.axis[1], s.axis[2] * k];
  const a = dot(d, d);
  const b = dot(m, d);
  const c = dot(m, m) - EARTH_EQUATORIAL_RADIUS_KM ** 2;
  const disc = b * b - a * c;
  if (disc < 0) return null;
  const lambda = (-b - Math.sqrt(disc)) / a;
  const p: Vec3 = [s.moon[0] + lambda * s.axis[0], s.moon[1] + lambda * s.axis[1], s.moon[2] + lambda * s.axis[2]];
  return { point: toGeodetic(toEarthFixed(p, s.thetaRad)), umbraRadiusKm: s.radiusAtMoonKm - lambda * s.tanF };
}

/**
 * How far a ground point lies outside the central cone at an instant, km (rho - |r|): negative inside.
 * A point with the Sun below its horizon counts as far outside.
 */
function marginKm(s: Shadow, groundFixed: Vec3, up: Vec3): number {
  const p = toInertial(groundFixed, s.thetaRad);
  const q = sub(p, s.moon);
  const lambda = dot(q, s.axis);
  const rho = Math.sqrt(Math.max(0, dot(q, q) - lambda * lambda));
  const r = s.radiusAtMoonKm - lambda * s.tanF;
  const sunward = dot(sub(s.sun, p), toInertial(up, s.thetaRad));
  return rho - Math.abs(r) + (sunward > 0 ? 0 : 10_000);
}

/** The least margin over the cone's passage near an instant (golden-section search to 0.1 s). */
function leastMarginKm(table: EphemerisTable, ground: GeoPoint, nearMs: number): number {
  const fixed = computeEarthFixedKm(ground);
  const phi = ground.latDeg * DEG;
  const lam = ground.lonDeg * DEG;
  const up: Vec3 = [Math.cos(phi) * Math.cos(lam), Math.cos(phi) * Math.sin(lam), Math.sin(phi)];
  return findMinimumByGoldenSection((ms) => marginKm(shadowAt(table, ms), fixed, up), nearMs - PASSAGE_HALF_WINDOW_MS, nearMs + PASSAGE_HALF_WINDOW_MS, 100).value;
}

/** The limit on one side: the distance along the bearing where the least margin crosses zero, to 5 m. */
function findLimit(table: EphemerisTable, centre: GeoPoint, bearingDeg: number, utcMs: number): GeoPoint | null {
  const at = (s: number) => leastMarginKm(table, moveAlong(centre, bearingDeg, s), utcMs);
  if (at(0) >= 0) return null;
  let inside = 0;
  let outside = 20;
  while (at(outside) < 0) {
    inside = outside;
    outside *= 2;
    if (outside > MAX_HALF_WIDTH_KM) return null;
  }
  while (outside - inside > 0.005) {
    const mid = (inside + outside) / 2;
    if (at(mid) < 0) inside = mid;
    else outside = mid;
  }
  return moveAlong(centre, bearingDeg, (inside + outside) / 2);
}

/** First or last instant the axis meets the Earth, by bisection to 1 s. */
function findAxisEnd(table: EphemerisTable, peakMs: number, direction: 1 | -1): number {
  let inside = peakMs;
  let outside = peakMs + direction * (AXIS_HALF_WINDOW_MS - 2 * GRID_STEP_MS);
  if (intersectAxis(shadowAt(table, outside))) throw new AstroError("not-found", "the shadow axis still meets the Earth 5 hours from greatest eclipse");
  while (Math.abs(outside - inside) > 1000) {
    const mid = (inside + outside) / 2;
    if (intersectAxis(shadowAt(table, mid))) inside = mid;
    else outside = mid;
  }
  return inside;
}

function buildTable(peakUtcMs: number): EphemerisTable {
  const start = Math.floor((peakUtcMs - AXIS_HALF_WINDOW_MS) / GRID_STEP_MS) * GRID_STEP_MS;
  return new EphemerisTable(start, Math.ceil((2 * AXIS_HALF_WINDOW_MS) / GRID_STEP_MS) + 3);
}

function sampleAt(table: EphemerisTable, utcMs: number, path: { startMs: number; endMs: number }, leftIsNorth: boolean | null): CentralPathSample & { left: GeoPoint | null; right: GeoPoint | null } {
  const hit = intersectAxis(shadowAt(table, utcMs));
  if (!hit) throw new AstroError("not-found", "the shadow axis misses the Earth at this instant");
  // The path's direction from the central points a little before and after (one-sided at the ends).
  const before = intersectAxis(shadowAt(table, Math.max(path.startMs, utcMs - 20_000)))!.point;
  const after = intersectAxis(shadowAt(table, Math.min(path.endMs, utcMs + 20_000)))!.point;
  const heading = computeBearingDeg(before, after);
  const left = findLimit(table, hit.point, heading - 90, utcMs);
  const right = findLimit(table, hit.point, heading + 90, utcMs);
  const isLeftNorth = leftIsNorth ?? (left && right ? left.latDeg >= right.latDeg : true);
  const north = isLeftNorth ? left : right;
  const south = isLeftNorth ? right : left;
  return {
    utcMs,
    central: hit.point,
    north,
    south,
    widthKm: north && south ? computeChordKm(north, south) : null,
    umbraRadiusKm: hit.umbraRadiusKm,
    left,
    right,
  };
}

/**
 * The path of a central eclipse whose greatest eclipse is near peakUtcMs: a sample every stepS
 * seconds (and at both ends) from the first to the last contact of the shadow axis with the Earth.
 * Returns null when the axis misses the Earth at the peak (a partial eclipse). The limits beyond
 * the ends of the central line (where the path's edges meet the sunrise and sunset terminators)
 * are not traced.
 */
export function computeCentralPath(peakUtcMs: number, stepS = 120): CentralPath | null {
  validateUtcMs(peakUtcMs, "peakUtcMs");
  if (!(stepS >= 10 && stepS <= 1800)) throw new AstroError("bad-parameter", `stepS must be from 10 to 1800 seconds, got ${String(stepS)}`, "stepS");
  const table = buildTable(peakUtcMs);
  if (!intersectAxis(shadowAt(table, peakUtcMs))) return null;
  const startMs = findAxisEnd(table, peakUtcMs, -1);
  const endMs = findAxisEnd(table, peakUtcMs, 1);
  const span = { startMs, endMs };
  const reference = sampleAt(table, peakUtcMs, span, null);
  const leftIsNorth = reference.left && reference.right ? reference.left.latDeg >= reference.right.latDeg : true;
  const times: number[] = [startMs];
  for (let t = Math.ceil(startMs / (stepS * 1000)) * stepS * 1000; t < endMs; t += stepS * 1000) if (t > startMs) times.push(t);
  times.push(endMs);
  const samples = times.map((t) => {
    const { left: _l, right: _r, ...sample } = sampleAt(table, t, span, leftIsNorth);
    void _l;
    void _r;
    return sample;
  });
  return { startUtcMs: startMs, endUtcMs: endMs, samples };
}

/** One sample of the path at an instant (for example greatest eclipse): the central point, both limits and the width. */
export function computeCentralPathAt(peakUtcMs: number, utcMs: number): CentralPathSample | null {
  validateUtcMs(utcMs);
  const table = buildTable(peakUtcMs);
  if (!intersectAxis(shadowAt(table, utcMs))) return null;
  const span = { startMs: table.endMs - 2 * AXIS_HALF_WINDOW_MS, endMs: table.endMs };
  const { left: _l, right: _r, ...sample } = sampleAt(table, utcMs, span, null);
  void _l;
  void _r;
  return sample;
}

export interface NearestPathPoint {
  point: GeoPoint;
  distanceKm: number;
  /** From the site toward the point, degrees from north through east. */
  bearingDeg: number;
}

/** Nearest point of a segment a-b to p, on a local flat map around p (good to a fraction of a per cent within a few thousand km). */
function nearestOnSegment(p: GeoPoint, a: GeoPoint, b: GeoPoint): GeoPoint {
  const wrap = (lon: number) => ((((lon - p.lonDeg + 180) % 360) + 360) % 360) - 180;
  const k = Math.cos(p.latDeg * DEG);
  const ax = wrap(a.lonDeg) * k;
  const ay = a.latDeg - p.latDeg;
  const bx = wrap(b.lonDeg) * k;
  const by = b.latDeg - p.latDeg;
  const dx = bx - ax;
  const dy = by - ay;
  const len2 = dx * dx + dy * dy;
  const t = len2 === 0 ? 0 : Math.min(1, Math.max(0, -(ax * dx + ay * dy) / len2));
  const lon = p.lonDeg + (k === 0 ? 0 : (ax + t * dx) / k);
  return { latDeg: ay + t * dy + p.latDeg, lonDeg: ((((lon + 180) % 360) + 360) % 360) - 180 };
}

/**
 * The nearest point of the path's outline (both limits and the two ends) to a site, with the
 * distance and the direction to it. For a site outside the path this is the nearest place of
 * totality (or annularity); null when the path has no traced limits.
 */
export function findNearestPathPoint(path: CentralPath, site: GeoPoint): NearestPathPoint | null {
  const edges: [GeoPoint, GeoPoint][] = [];
  const lines = [path.samples.map((s) => s.north), path.samples.map((s) => s.south)];
  for (const line of lines) {
    for (let i = 1; i < line.length; i++) {
      const a = line[i - 1];
      const b = line[i];
      if (a && b) edges.push([a, b]);
    }
  }
  for (const s of [path.samples[0], path.samples[path.samples.length - 1]]) {
    if (s?.north) edges.push([s.north, s.central]);
    if (s?.south) edges.push([s.central, s.south]);
  }
  let best: NearestPathPoint | null = null;
  for (const [a, b] of edges) {
    // Coarse first: skip segments clearly farther than the best so far.
    const rough = Math.min(computeSurfaceDistanceKm(site, a), computeSurfaceDistanceKm(site, b));
    if (best && rough > best.distanceKm + 600) continue;
    const point = nearestOnSegment(site, a, b);
    const distanceKm = computeSurfaceDistanceKm(site, point);
    if (!best || distanceKm < best.distanceKm) best = { point, distanceKm, bearingDeg: computeBearingDeg(site, point) };
  }
  return best;
}

const COMPASS = ["north", "north-northeast", "northeast", "east-northeast", "east", "east-southeast", "southeast", "south-southeast", "south", "south-southwest", "southwest", "west-southwest", "west", "west-northwest", "northwest", "north-northwest"];

/** A bearing in words, on the 16-point compass. */
export function describeBearing(bearingDeg: number): string {
  const i = Math.round((((bearingDeg % 360) + 360) % 360) / 22.5) % 16;
  return COMPASS[i];
}
