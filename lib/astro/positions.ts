// Topocentric apparent Sun and Moon, their semi-diameters, and where the Moon
// stands against the Sun. Vectors are J2000 equatorial (EQJ) in AU from
// astronomy-engine, rotated to the true equator and equinox of date for RA/Dec.
//
// Apparent places: astronomy-engine corrects the Sun for light time and
// aberration. Its GeoMoon is geometric; for the Moon, which travels with the
// Earth, light time and annual aberration nearly cancel, leaving the Moon's
// geocentric motion during the light time (about 1.3 s, up to 0.7 arcsec), so we
// take the Moon at t - tau. Refraction is left out of RA/Dec and separations: it
// shifts Sun and Moon alike at the scale of a disk.
import {
  AstroTime,
  Body,
  GeoMoon,
  GeoVector,
  Horizon,
  KM_PER_AU,
  C_AUDAY,
  Observer,
  ObserverVector,
  RotateVector,
  Rotation_EQJ_EQD,
  Vector,
} from "astronomy-engine";
import { computeSunOrientation } from "./sun-orientation";
import { SiteLocation, convertAstroTimeToUtcMs, makeAstroTime, makeObserver } from "./site-time";

const DEG = Math.PI / 180;
const ARCSEC_PER_RAD = 206_264.80624709636;
/** Solar semi-diameter at 1 au, arcsec (Auwers; RSUN_OBS convention in solar FITS headers). */
export const SUN_SEMI_DIAMETER_1AU_ARCSEC = 959.63;
/** Earth equatorial radius, km (IERS/WGS 84), the unit of the lunar radius ratio k. */
export const EARTH_EQUATORIAL_RADIUS_KM = 6378.137;
/** Moon/Earth radius ratio: mean limb (penumbral contacts) and mean minimum (umbral contacts, durations), as in NASA predictions. */
export const MOON_K_MEAN = 0.2725076;
export const MOON_K_UMBRAL = 0.272281;

export interface BodyPosition {
  /** Right ascension and declination of date (true equator and equinox), topocentric. */
  raDeg: number;
  decDeg: number;
  distanceKm: number;
  /** Geometric altitude (no refraction) and with standard refraction; azimuth from north through east. */
  altDeg: number;
  apparentAltDeg: number;
  azDeg: number;
  semiDiameterArcsec: number;
}

/** Offset of the Moon's centre from the Sun's on the sky, tangent plane at the Sun, arcsec. */
export interface SkyOffset {
  northArcsec: number;
  eastArcsec: number;
  /** The same offset along the Sun's rotation axis (P angle applied): toward solar north and solar east. */
  solarNorthArcsec: number;
  solarEastArcsec: number;
}

export interface SunMoonState {
  utcMs: number;
  sun: BodyPosition;
  /** Moon semi-diameter here is the mean limb (k = 0.2725076). */
  moon: BodyPosition & { umbralSemiDiameterArcsec: number };
  separationArcsec: number;
  moonMinusSun: SkyOffset;
  pDeg: number;
}

export interface TopocentricVectors {
  sun: Vector;
  moon: Vector;
}

/** Topocentric apparent Sun and Moon (EQJ, AU) for an observer at an astronomy-engine time. */
export function computeTopocentricVectors(time: AstroTime, observer: Observer): TopocentricVectors {
  const obs = ObserverVector(time, observer, false);
  const sunGeo = GeoVector(Body.Sun, time, true);
  let moonGeo = GeoMoon(time);
  // One light-time iteration is enough: tau changes by microseconds.
  const tauDays = Math.hypot(moonGeo.x - obs.x, moonGeo.y - obs.y, moonGeo.z - obs.z) / C_AUDAY;
  moonGeo = GeoMoon(time.AddDays(-tauDays));
  return {
    sun: new Vector(sunGeo.x - obs.x, sunGeo.y - obs.y, sunGeo.z - obs.z, time),
    moon: new Vector(moonGeo.x - obs.x, moonGeo.y - obs.y, moonGeo.z - obs.z, time),
  };
}

function lengthOf(v: Vector): number {
  return Math.hypot(v.x, v.y, v.z);
}

/** Angle between two vectors in arcsec, by atan2 so that arcsecond separations keep their precision. */
export function computeSeparationArcsec(a: Vector, b: Vector): number {
  const cx = a.y * b.z - a.z * b.y;
  const cy = a.z * b.x - a.x * b.z;
  const cz = a.x * b.y - a.y * b.x;
  const dot = a.x * b.x + a.y * b.y + a.z * b.z;
  return Math.atan2(Math.hypot(cx, cy, cz), dot) * ARCSEC_PER_RAD;
}

export function computeSunSemiDiameterArcsec(distanceAu: number): number {
  return SUN_SEMI_DIAMETER_1AU_ARCSEC / distanceAu;
}

export function computeMoonSemiDiameterArcsec(distanceKm: number, k = MOON_K_MEAN): number {
  return Math.asin((k * EARTH_EQUATORIAL_RADIUS_KM) / distanceKm) * ARCSEC_PER_RAD;
}

function toRaDec(eqd: Vector): { raDeg: number; decDeg: number } {
  const raDeg = Math.atan2(eqd.y, eqd.x) / DEG;
  return { raDeg: raDeg < 0 ? raDeg + 360 : raDeg, decDeg: Math.atan2(eqd.z, Math.hypot(eqd.x, eqd.y)) / DEG };
}

/** Gnomonic standard coordinates of b about a (both RA/Dec, degrees): east and north, arcsec. */
function computeStandardCoordinates(a: { raDeg: number; decDeg: number }, b: { raDeg: number; decDeg: number }) {
  const d0 = a.decDeg * DEG;
  const d = b.decDeg * DEG;
  const dra = (b.raDeg - a.raDeg) * DEG;
  const denom = Math.sin(d) * Math.sin(d0) + Math.cos(d) * Math.cos(d0) * Math.cos(dra);
  return {
    eastArcsec: ((Math.cos(d) * Math.sin(dra)) / denom) * ARCSEC_PER_RAD,
    northArcsec: ((Math.sin(d) * Math.cos(d0) - Math.cos(d) * Math.sin(d0) * Math.cos(dra)) / denom) * ARCSEC_PER_RAD,
  };
}

/** Rotates a north/east offset into the Sun's frame: solar north lies at position angle P east of celestial north. */
export function rotateToSolarFrame(northArcsec: number, eastArcsec: number, pDeg: number): SkyOffset {
  const c = Math.cos(pDeg * DEG);
  const s = Math.sin(pDeg * DEG);
  return {
    northArcsec,
    eastArcsec,
    solarNorthArcsec: northArcsec * c + eastArcsec * s,
    solarEastArcsec: eastArcsec * c - northArcsec * s,
  };
}

function describeBody(time: AstroTime, observer: Observer, eqj: Vector, semiDiameterArcsec: number): BodyPosition {
  const eqd = RotateVector(Rotation_EQJ_EQD(time), eqj);
  const { raDeg, decDeg } = toRaDec(eqd);
  const geometric = Horizon(time, observer, raDeg / 15, decDeg);
  const refracted = Horizon(time, observer, raDeg / 15, decDeg, "normal");
  return {
    raDeg,
    decDeg,
    distanceKm: lengthOf(eqj) * KM_PER_AU,
    altDeg: geometric.altitude,
    apparentAltDeg: refracted.altitude,
    azDeg: geometric.azimuth,
    semiDiameterArcsec,
  };
}

function computeStateAt(time: AstroTime, observer: Observer): SunMoonState {
  const v = computeTopocentricVectors(time, observer);
  const sunDistanceAu = lengthOf(v.sun);
  const moonDistanceKm = lengthOf(v.moon) * KM_PER_AU;
  const sun = describeBody(time, observer, v.sun, computeSunSemiDiameterArcsec(sunDistanceAu));
  const moonBase = describeBody(time, observer, v.moon, computeMoonSemiDiameterArcsec(moonDistanceKm, MOON_K_MEAN));
  const utcMs = convertAstroTimeToUtcMs(time);
  const pDeg = computeSunOrientation(utcMs).pDeg;
  const std = computeStandardCoordinates(sun, moonBase);
  return {
    utcMs,
    sun,
    moon: { ...moonBase, umbralSemiDiameterArcsec: computeMoonSemiDiameterArcsec(moonDistanceKm, MOON_K_UMBRAL) },
    separationArcsec: computeSeparationArcsec(v.sun, v.moon),
    moonMinusSun: rotateToSolarFrame(std.northArcsec, std.eastArcsec, pDeg),
    pDeg,
  };
}

/** Topocentric apparent Sun and Moon, semi-diameters and the Moon-minus-Sun offset for a site at a UTC instant. */
export function computeSunMoonState(site: SiteLocation, utcMs: number): SunMoonState {
  return computeStateAt(makeAstroTime(utcMs), makeObserver(site));
}

export interface OffsetRate {
  northArcsecPerS: number;
  eastArcsecPerS: number;
  solarNorthArcsecPerS: number;
  solarEastArcsecPerS: number;
  /** Speed of the Moon against the Sun on the sky. */
  totalArcsecPerS: number;
  /** Direction of that motion, position angle from celestial north through east. */
  positionAngleDeg: number;
}

/** Half-width of the central difference for rates: long enough to swamp rounding, short against curvature. */
const RATE_HALF_STEP_S = 1;

function differenceOffsets(before: SkyOffset, after: SkyOffset, spanS: number): OffsetRate {
  const n = (after.northArcsec - before.northArcsec) / spanS;
  const e = (after.eastArcsec - before.eastArcsec) / spanS;
  const pa = Math.atan2(e, n) / DEG;
  return {
    northArcsecPerS: n,
    eastArcsecPerS: e,
    solarNorthArcsecPerS: (after.solarNorthArcsec - before.solarNorthArcsec) / spanS,
    solarEastArcsecPerS: (after.solarEastArcsec - before.solarEastArcsec) / spanS,
    totalArcsecPerS: Math.hypot(n, e),
    positionAngleDeg: pa < 0 ? pa + 360 : pa,
  };
}

/** Rate of the topocentric Moon-minus-Sun offset (central difference over 2 s), arcsec/s. */
export function computeMoonSunOffsetRate(site: SiteLocation, utcMs: number): OffsetRate {
  const before = computeSunMoonState(site, utcMs - RATE_HALF_STEP_S * 1000);
  const after = computeSunMoonState(site, utcMs + RATE_HALF_STEP_S * 1000);
  return differenceOffsets(before.moonMinusSun, after.moonMinusSun, 2 * RATE_HALF_STEP_S);
}

/** Same rate for an observer at the Earth's centre (what mean-motion figures describe), arcsec/s. */
export function computeGeocentricMoonSunRate(utcMs: number): OffsetRate {
  const offsetAt = (ms: number): SkyOffset => {
    const time = makeAstroTime(ms);
    const rot = Rotation_EQJ_EQD(time);
    const sun = toRaDec(RotateVector(rot, GeoVector(Body.Sun, time, true)));
    const moonNow = GeoMoon(time);
    const moon = toRaDec(RotateVector(rot, GeoMoon(time.AddDays(-lengthOf(moonNow) / C_AUDAY))));
    const std = computeStandardCoordinates(sun, moon);
    return rotateToSolarFrame(std.northArcsec, std.eastArcsec, pDeg);
  };
  const pDeg = computeSunOrientation(utcMs).pDeg;
  return differenceOffsets(offsetAt(utcMs - RATE_HALF_STEP_S * 1000), offsetAt(utcMs + RATE_HALF_STEP_S * 1000), 2 * RATE_HALF_STEP_S);
}
