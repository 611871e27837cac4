// Sites and instants as astronomy-engine wants them. Instants cross our API as
// UTC milliseconds since 1970 (what Date and the database hold); astronomy-engine
// keeps both UT (Earth rotation) and TT (ephemeris time), related by its Delta T
// model (Espenak and Meeus polynomials). astronomy-engine treats UTC as UT1;
// the difference stays below 0.9 s by the definition of UTC.
import { AstroTime, Observer } from "astronomy-engine";
import { AstroError, requireFinite } from "./errors";

/** A fixed observing site: geodetic latitude and longitude (east positive) on WGS 84, height above the ellipsoid. */
export interface SiteLocation {
  latDeg: number;
  lonDeg: number;
  elevationM: number;
}

const MS_PER_DAY = 86_400_000;
/** 2000-01-01T12:00:00Z, the J2000 epoch astronomy-engine counts days from. */
const J2000_UTC_MS = Date.UTC(2000, 0, 1, 12, 0, 0);
/** Julian Date of J2000.0. */
export const JD_J2000 = 2451545.0;

/** Throws a bad-parameter error naming the field when the site is not a usable place on Earth. */
export function validateSite(site: SiteLocation, field = "site"): void {
  if (site === null || typeof site !== "object") {
    throw new AstroError("bad-parameter", `${field} must be an object with latDeg, lonDeg and elevationM`, field);
  }
  requireFinite(`${field}.latDeg`, site.latDeg, -90, 90);
  requireFinite(`${field}.lonDeg`, site.lonDeg, -180, 180);
  // From the Dead Sea shore to a high-altitude aircraft: anything else is a typo.
  requireFinite(`${field}.elevationM`, site.elevationM, -500, 20_000);
}

export function makeObserver(site: SiteLocation): Observer {
  validateSite(site);
  return new Observer(site.latDeg, site.lonDeg, site.elevationM);
}

/** Throws unless the instant is finite UTC milliseconds within the span astronomy-engine is good for (years 1600 to 2500). */
export function validateUtcMs(utcMs: number, field = "utcMs"): void {
  requireFinite(field, utcMs, Date.UTC(1600, 0, 1), Date.UTC(2500, 0, 1));
}

export function makeAstroTime(utcMs: number, field = "utcMs"): AstroTime {
  validateUtcMs(utcMs, field);
  return new AstroTime((utcMs - J2000_UTC_MS) / MS_PER_DAY);
}

export function convertAstroTimeToUtcMs(time: AstroTime): number {
  return J2000_UTC_MS + time.ut * MS_PER_DAY;
}

/** An instant given in Terrestrial Time as a Julian Ephemeris Day (how Meeus and the almanacs tabulate). */
export function makeAstroTimeFromJde(jde: number): AstroTime {
  requireFinite("jde", jde, 2305447.5, 2634166.5);
  return AstroTime.FromTerrestrialTime(jde - JD_J2000);
}

/** Delta T = TT - UT in seconds at the instant, from astronomy-engine's model. */
export function computeDeltaTS(utcMs: number): number {
  const t = makeAstroTime(utcMs);
  return (t.tt - t.ut) * 86_400;
}
