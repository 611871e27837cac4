// Orientation of the Sun's disk seen from the Earth's centre, after Meeus,
// Astronomical Algorithms, 2nd ed., chapter 29 ("Ephemeris for Physical
// Observations of the Sun"), with Carrington's elements (I = 7.25 deg, the node
// K and the rotation theta of the prime meridian, period 25.38 days).
//   P  position angle of the northern extremity of the Sun's rotation axis,
//      measured eastward from the north point of the disk;
//   B0 heliographic latitude of the centre of the disk;
//   L0 heliographic (Carrington) longitude of the centre of the disk.
// Meeus works in Terrestrial Time (JDE); astronomy-engine's AstroTime carries
// both scales, so callers give UTC and we read TT from it.
import { AstroTime, SunPosition, e_tilt } from "astronomy-engine";
import { JD_J2000, makeAstroTime, makeAstroTimeFromJde } from "./site-time";

export interface SunOrientation {
  pDeg: number;
  b0Deg: number;
  l0Deg: number;
}

const DEG = Math.PI / 180;
/** Inclination of the solar equator on the ecliptic (Carrington), Meeus ch. 29. */
const SOLAR_EQUATOR_INCLINATION_DEG = 7.25;

function normalizeDeg(angleDeg: number): number {
  const a = angleDeg % 360;
  return a < 0 ? a + 360 : a;
}

function computeOrientation(time: AstroTime): SunOrientation {
  const jde = time.tt + JD_J2000;
  // Meeus eq. 29 preamble: rotation angle theta and the node K of the solar equator.
  const thetaDeg = ((jde - 2398220) * 360) / 25.38;
  const kDeg = 73.6667 + (1.3958333 * (jde - 2396758)) / 36525;

  // lambda: apparent longitude with aberration but without nutation; lambda' adds
  // nutation in longitude; eps is the true obliquity (Meeus ch. 29). astronomy-engine's
  // SunPosition is already on the true equinox, so we take nutation back out.
  const tilt = e_tilt(time);
  const lambdaPrimeDeg = SunPosition(time).elon;
  const lambdaDeg = lambdaPrimeDeg - tilt.dpsi / 3600;
  const epsRad = tilt.tobl * DEG;
  const iRad = SOLAR_EQUATOR_INCLINATION_DEG * DEG;
  const lkRad = (lambdaDeg - kDeg) * DEG;

  const xRad = Math.atan(-Math.cos(lambdaPrimeDeg * DEG) * Math.tan(epsRad));
  const yRad = Math.atan(-Math.cos(lkRad) * Math.tan(iRad));
  const b0Rad = Math.asin(Math.sin(lkRad) * Math.sin(iRad));
  // tan(eta) = tan(lambda - K) cos I, eta in the quadrant of (-sin(lambda-K) cos I, -cos(lambda-K)).
  const etaRad = Math.atan2(-Math.sin(lkRad) * Math.cos(iRad), -Math.cos(lkRad));

  return {
    pDeg: (xRad + yRad) / DEG,
    b0Deg: b0Rad / DEG,
    l0Deg: normalizeDeg(etaRad / DEG - thetaDeg),
  };
}

/**
 * P, B0 and L0 in degrees at a UTC instant. Geocentric: the solar parallax is 8.8 arcsec,
 * so a site on the Earth's surface sees angles that differ by far less than 0.01 deg.
 */
export function computeSunOrientation(utcMs: number): SunOrientation {
  return computeOrientation(makeAstroTime(utcMs));
}

/** P, B0 and L0 at an instant given in Terrestrial Time as a Julian Ephemeris Day (to compare with almanacs at 0h TT). */
export function computeSunOrientationAtJde(jde: number): SunOrientation {
  return computeOrientation(makeAstroTimeFromJde(jde));
}
