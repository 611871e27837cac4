// Plate scale and what the Sun looks like on the sensor.
//   expected scale, arcsec/px = 206.265 x pitch (um) / effective focal length (mm)
//   (206265 arcsec per radian, um over mm giving the 1e-3);
//   measured scale = Moon's topocentric semi-diameter (arcsec) / fitted limb radius (px).
import { requireFinite, requirePositive } from "./errors";
import { SUN_SEMI_DIAMETER_1AU_ARCSEC } from "./positions";

const ARCSEC_PER_RAD = 206_264.80624709636;

export interface OpticsKit {
  pixelPitchUm: number;
  focalMm: number;
  /** Multiplies the focal length; 1 without a teleconverter. */
  teleconverter?: number;
}

export interface SensorSize {
  sensorWidthMm: number;
  sensorHeightMm: number;
}

export function computeEffectiveFocalMm(kit: OpticsKit): number {
  requirePositive("focalMm", kit.focalMm);
  const tc = kit.teleconverter ?? 1;
  requirePositive("teleconverter", tc);
  return kit.focalMm * tc;
}

/** Plate scale expected from the kit, arcsec per pixel, at the centre of a distortion-free field. */
export function computeExpectedPlateScaleArcsecPerPx(kit: OpticsKit): number {
  requirePositive("pixelPitchUm", kit.pixelPitchUm);
  return (ARCSEC_PER_RAD * 1e-3 * kit.pixelPitchUm) / computeEffectiveFocalMm(kit);
}

/** Plate scale measured from a limb fit: the Moon's topocentric semi-diameter over the fitted radius. */
export function computeMeasuredPlateScaleArcsecPerPx(moonSemiDiameterArcsec: number, limbRadiusPx: number): number {
  requirePositive("moonSemiDiameterArcsec", moonSemiDiameterArcsec);
  requirePositive("limbRadiusPx", limbRadiusPx);
  return moonSemiDiameterArcsec / limbRadiusPx;
}

export interface SunImageSize {
  diameterMm: number;
  diameterPx: number;
}

/**
 * Diameter of the Sun's image on the sensor (2 f tan s). Defaults to the mean semi-diameter
 * at 1 au (959.63 arcsec); pass the day's value from the ephemeris for the exact size.
 * Common practice (no source) puts it at about focal length / 109.
 */
export function computeSunImageSize(kit: OpticsKit, sunSemiDiameterArcsec = SUN_SEMI_DIAMETER_1AU_ARCSEC): SunImageSize {
  requirePositive("sunSemiDiameterArcsec", sunSemiDiameterArcsec);
  requirePositive("pixelPitchUm", kit.pixelPitchUm);
  const diameterMm = 2 * computeEffectiveFocalMm(kit) * Math.tan(sunSemiDiameterArcsec / ARCSEC_PER_RAD);
  return { diameterMm, diameterPx: (diameterMm * 1000) / kit.pixelPitchUm };
}

export interface FieldInSolarRadii {
  /** Full field across the width and the height, in solar radii. */
  widthRsun: number;
  heightRsun: number;
  /** How far the corona can be followed from a centred Sun: to the nearer edge, and to a corner. */
  reachToEdgeRsun: number;
  reachToCornerRsun: number;
}

/** Field of view of a sensor in solar radii (gnomonic projection: angle = 2 atan(size / 2f)). */
export function computeFieldInSolarRadii(
  kit: OpticsKit & SensorSize,
  sunSemiDiameterArcsec = SUN_SEMI_DIAMETER_1AU_ARCSEC,
): FieldInSolarRadii {
  requirePositive("sensorWidthMm", kit.sensorWidthMm);
  requirePositive("sensorHeightMm", kit.sensorHeightMm);
  requirePositive("sunSemiDiameterArcsec", sunSemiDiameterArcsec);
  const f = computeEffectiveFocalMm(kit);
  const halfAngleRsun = (halfMm: number) => (Math.atan(halfMm / f) * ARCSEC_PER_RAD) / sunSemiDiameterArcsec;
  const w = kit.sensorWidthMm / 2;
  const h = kit.sensorHeightMm / 2;
  return {
    widthRsun: 2 * halfAngleRsun(w),
    heightRsun: 2 * halfAngleRsun(h),
    reachToEdgeRsun: halfAngleRsun(Math.min(w, h)),
    reachToCornerRsun: halfAngleRsun(Math.hypot(w, h)),
  };
}

/** Longest effective focal length whose field still reaches the given radius at the nearer sensor edge, mm. */
export function computeFocalForReachMm(sensor: SensorSize, reachRsun: number, sunSemiDiameterArcsec = SUN_SEMI_DIAMETER_1AU_ARCSEC): number {
  requirePositive("sensorWidthMm", sensor.sensorWidthMm);
  requirePositive("sensorHeightMm", sensor.sensorHeightMm);
  requireFinite("reachRsun", reachRsun, 1e-3, 1000);
  const halfAngleRad = (reachRsun * sunSemiDiameterArcsec) / ARCSEC_PER_RAD;
  return Math.min(sensor.sensorWidthMm, sensor.sensorHeightMm) / 2 / Math.tan(halfAngleRad);
}
