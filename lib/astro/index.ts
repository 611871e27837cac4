// Sky geometry and exposure planning for Crownlight: pure functions on numbers,
// built on astronomy-engine. No I/O, no database, no framework.
//
// Conventions across this API:
// - instants are UTC milliseconds since 1970 (utcMs); astronomy-engine's Delta T
//   model supplies Terrestrial Time where the ephemeris needs it;
// - sites are { latDeg, lonDeg (east positive), elevationM };
// - angles are degrees unless the name says arcsec; position angles run from
//   celestial north through east; azimuth from north through east;
// - bad input throws AstroError with a code and the field at fault.

export { AstroError, type AstroErrorCode } from "./errors";
export {
  type SiteLocation,
  validateSite,
  validateUtcMs,
  computeDeltaTS,
  JD_J2000,
} from "./site-time";
export {
  type BodyPosition,
  type SkyOffset,
  type SunMoonState,
  type OffsetRate,
  computeSunMoonState,
  computeMoonSunOffsetRate,
  computeGeocentricMoonSunRate,
  computeSunSemiDiameterArcsec,
  computeMoonSemiDiameterArcsec,
  rotateToSolarFrame,
  SUN_SEMI_DIAMETER_1AU_ARCSEC,
  EARTH_EQUATORIAL_RADIUS_KM,
  MOON_K_MEAN,
  MOON_K_UMBRAL,
} from "./positions";
export { type SunOrientation, computeSunOrientation, computeSunOrientationAtJde } from "./sun-orientation";
export {
  type LocalEclipseKind,
  type ContactEvent,
  type LocalCircumstances,
  findLocalCircumstances,
  findLocalCircumstancesOnTrack,
  findNextLocalCircumstances,
  computeObscuration,
} from "./local-circumstances";
export {
  type MountKind,
  type CameraOrientation,
  computeParallacticAngleDeg,
  computeSunHourAngle,
  computeSunParallacticAngleDeg,
  computeFieldRotationRateArcsecPerS,
  computeSunFieldRotationRateArcsecPerS,
  computeFieldRotationDeg,
  computeNorthAngleInImageDeg,
  SIDEREAL_RATE_ARCSEC_PER_S,
} from "./mount-rotation";
export {
  type OpticsKit,
  type SensorSize,
  type SunImageSize,
  type FieldInSolarRadii,
  computeEffectiveFocalMm,
  computeExpectedPlateScaleArcsecPerPx,
  computeMeasuredPlateScaleArcsecPerPx,
  computeSunImageSize,
  computeFieldInSolarRadii,
  computeFocalForReachMm,
} from "./plate-scale";
export {
  type Phenomenon,
  type PhenomenonExponent,
  type NominalShutter,
  type LadderStep,
  type LadderOptions,
  PHENOMENON_EXPONENTS,
  findPhenomenonExponent,
  computeExposureS,
  findNominalShutter,
  computeExposureValue,
  resolveMarkedFNumber,
  resolveMarkedShutterS,
  buildExposureLadder,
} from "./exposure";
export { type TrackPoint, parseGpxTrack, parseCsvTrack, parseIsoUtcMs } from "./track-parse";
export { interpolateTrack, DEFAULT_TRACK_CLAMP_S } from "./track-interpolate";
export { type CatalogueEclipseKind, type CatalogueEclipse, listSolarEclipses } from "./catalogue";
export {
  type GeoPoint,
  type CentralPath,
  type CentralPathSample,
  type NearestPathPoint,
  computeCentralPath,
  computeCentralPathAt,
  findNearestPathPoint,
  describeBearing,
  computeSurfaceDistanceKm,
  computeBearingDeg,
} from "./central-path";
