// Parallactic angle, field rotation and where celestial north points in a frame.
//
// Parallactic angle q (Meeus, Astronomical Algorithms, 2nd ed., eq. 14.1):
//   tan q = sin H / (tan(phi) cos(delta) - sin(delta) cos H)
// the position angle of the zenith at the object, from celestial north through
// east; negative east of the meridian, positive west of it.
//
// Field rotation on a levelled mount (standard formula, from memory):
//   dq/dt = -omega cos(phi) cos(A) / cos(h),  omega = 15.041 arcsec/s (sidereal)
// with the azimuth A from north through east. The magnitude is the familiar
// 15.04 x cos(lat) x cos(az) / cos(alt); the sign makes it the rate of q, so that
// integrating the rate gives the change of q (for the Sun south of the zenith in
// the northern hemisphere, A near 180 deg, q grows through the meridian).
import { SiderealTime } from "astronomy-engine";
import { AstroError, requireFinite } from "./errors";
import { computeSunMoonState } from "./positions";
import { SiteLocation, makeAstroTime } from "./site-time";

const DEG = Math.PI / 180;
/** Earth's rotation relative to the stars, arcsec of angle per SI second (360 deg per 86164.0905 s). */
export const SIDEREAL_RATE_ARCSEC_PER_S = (360 * 3600) / 86_164.0905;

export type MountKind = "equatorial" | "alt-az" | "fixed-tripod" | "hand-held" | "stabilised";

/** Parallactic angle in degrees, in (-180, 180], from latitude, hour angle (west positive) and declination. Meeus eq. 14.1. */
export function computeParallacticAngleDeg(latDeg: number, hourAngleDeg: number, decDeg: number): number {
  requireFinite("latDeg", latDeg, -90, 90);
  requireFinite("hourAngleDeg", hourAngleDeg);
  requireFinite("decDeg", decDeg, -90, 90);
  const phi = latDeg * DEG;
  const h = hourAngleDeg * DEG;
  const d = decDeg * DEG;
  // atan2 form of eq. 14.1 with cos(phi) multiplied through, so the poles stay finite.
  return Math.atan2(Math.sin(h) * Math.cos(phi), Math.sin(phi) * Math.cos(d) - Math.cos(phi) * Math.sin(d) * Math.cos(h)) / DEG;
}

/** The Sun's topocentric hour angle (degrees, west positive, in (-180, 180]) and declination of date at a site and instant. */
export function computeSunHourAngle(site: SiteLocation, utcMs: number): { hourAngleDeg: number; decDeg: number } {
  const s = computeSunMoonState(site, utcMs);
  const lstDeg = SiderealTime(makeAstroTime(utcMs)) * 15 + site.lonDeg;
  let ha = (lstDeg - s.sun.raDeg) % 360;
  if (ha > 180) ha -= 360;
  if (ha <= -180) ha += 360;
  return { hourAngleDeg: ha, decDeg: s.sun.decDeg };
}

/** Parallactic angle of the Sun's centre at a site and instant, degrees. */
export function computeSunParallacticAngleDeg(site: SiteLocation, utcMs: number): number {
  const { hourAngleDeg, decDeg } = computeSunHourAngle(site, utcMs);
  return computeParallacticAngleDeg(site.latDeg, hourAngleDeg, decDeg);
}

/**
 * Rate of field rotation for a levelled (alt-az) mount, arcsec of rotation per second of time,
 * signed as the rate of the parallactic angle. Grows without bound toward the zenith: refuses
 * altitudes within 0.01 deg of it, where no mount can follow anyway.
 */
export function computeFieldRotationRateArcsecPerS(latDeg: number, altDeg: number, azDeg: number): number {
  requireFinite("latDeg", latDeg, -90, 90);
  requireFinite("altDeg", altDeg, -90, 90);
  requireFinite("azDeg", azDeg);
  if (Math.abs(altDeg) > 89.99) {
    throw new AstroError("out-of-range", `altDeg ${altDeg} is at the zenith, where field rotation is unbounded`, "altDeg");
  }
  return (-SIDEREAL_RATE_ARCSEC_PER_S * Math.cos(latDeg * DEG) * Math.cos(azDeg * DEG)) / Math.cos(altDeg * DEG);
}

/** Field rotation rate for the Sun at a site and instant, arcsec/s (see computeFieldRotationRateArcsecPerS). */
export function computeSunFieldRotationRateArcsecPerS(site: SiteLocation, utcMs: number): number {
  const s = computeSunMoonState(site, utcMs);
  return computeFieldRotationRateArcsecPerS(site.latDeg, s.sun.altDeg, s.sun.azDeg);
}

function wrapDeg(angleDeg: number): number {
  let a = angleDeg % 360;
  if (a > 180) a -= 360;
  if (a <= -180) a += 360;
  return a;
}

/**
 * Total field rotation on a levelled mount between two instants, degrees: the change of the Sun's
 * parallactic angle, followed in steps of at most 10 minutes so that a turn through the meridian
 * near the zenith is not mistaken for its opposite.
 */
export function computeFieldRotationDeg(site: SiteLocation, startUtcMs: number, endUtcMs: number): number {
  requireFinite("startUtcMs", startUtcMs);
  requireFinite("endUtcMs", endUtcMs);
  if (endUtcMs < startUtcMs) {
    throw new AstroError("bad-parameter", `endUtcMs must not be before startUtcMs`, "endUtcMs");
  }
  const steps = Math.max(1, Math.ceil((endUtcMs - startUtcMs) / 600_000));
  let total = 0;
  let previous = computeSunParallacticAngleDeg(site, startUtcMs);
  for (let i = 1; i <= steps; i++) {
    const q = computeSunParallacticAngleDeg(site, startUtcMs + ((endUtcMs - startUtcMs) * i) / steps);
    total += wrapDeg(q - previous);
    previous = q;
  }
  return total;
}

export interface CameraOrientation {
  mount: MountKind;
  /**
   * Where the mount's reference direction appears in the unflipped image, degrees
   * counter-clockwise from image up (0 when the camera is square to it):
   *  - equatorial: celestial north (camera squared to the declination axis at set-up);
   *  - alt-az and fixed tripod: the zenith (camera levelled).
   */
  cameraRollDeg?: number;
  flipHorizontal?: boolean;
  flipVertical?: boolean;
}

/**
 * Position angle of celestial north in the image: degrees counter-clockwise from image up
 * (i.e. toward image left), after the camera's own flips; null when the mount gives no
 * reference (hand-held, stabilised platform) and the frame must be solved on the sky.
 * On a sky image that is not mirrored, position angles run counter-clockwise (east is left
 * of north), so on a levelled camera the zenith at angle q east of north puts north at -q.
 */
export function computeNorthAngleInImageDeg(camera: CameraOrientation, site: SiteLocation, utcMs: number): number | null {
  const roll = camera.cameraRollDeg ?? 0;
  requireFinite("cameraRollDeg", roll);
  let angle: number;
  switch (camera.mount) {
    case "equatorial":
      // The mount turns with the sky: north keeps the direction it had at set-up.
      angle = roll;
      break;
    case "alt-az":
    case "fixed-tripod":
      // The camera stays level: image up is the zenith, which sits at q east of north.
      angle = roll - computeSunParallacticAngleDeg(site, utcMs);
      break;
    case "hand-held":
    case "stabilised":
      return null;
    default:
      throw new AstroError("bad-parameter", `mount must be one of equatorial, alt-az, fixed-tripod, hand-held, stabilised; got ${String(camera.mount)}`, "mount");
  }
  // A horizontal flip mirrors angles about the vertical; a vertical flip about the horizontal.
  if (camera.flipHorizontal) angle = -angle;
  if (camera.flipVertical) angle = 180 - angle;
  return ((angle % 360) + 360) % 360;
}
