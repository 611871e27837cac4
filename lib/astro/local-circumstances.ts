// Local circumstances of a solar eclipse at a site, fixed or moving.
//
// astronomy-engine's SearchLocalSolarEclipse finds the eclipse and rough contact
// times, but models the Moon as a sphere of mean radius 1737.4 km. Published
// predictions time first and fourth contact with the mean limb (k = 0.2725076)
// and second and third contact with the mean minimum radius (k = 0.272281), the
// valleys of the limb profile that let the last sunlight through. We therefore
// refine every contact ourselves from topocentric apparent positions:
//   first/fourth contact: separation = s_moon(k = 0.2725076) + s_sun
//   second/third contact: separation = |s_moon(k = 0.272281) - s_sun|
// by bisection to 1 ms, and find maximum eclipse as the least separation.
import { AstroTime, KM_PER_AU, SearchLocalSolarEclipse } from "astronomy-engine";
import { AstroError } from "./errors";
import {
  MOON_K_MEAN,
  MOON_K_UMBRAL,
  computeMoonSemiDiameterArcsec,
  computeSeparationArcsec,
  computeSunMoonState,
  computeSunSemiDiameterArcsec,
  computeTopocentricVectors,
} from "./positions";
import { SiteLocation, convertAstroTimeToUtcMs, makeAstroTime, makeObserver, validateUtcMs } from "./site-time";
import { findMinimumByGoldenSection } from "./search";
import { interpolateTrack } from "./track-interpolate";
import { TrackPoint } from "./track-parse";

export type LocalEclipseKind = "partial" | "annular" | "total";

export interface ContactEvent {
  utcMs: number;
  /** The Sun's centre: geometric altitude, altitude with standard refraction, azimuth from north through east. */
  sunAltDeg: number;
  sunApparentAltDeg: number;
  sunAzDeg: number;
  /** Where on the Sun's limb the contact happens (at maximum: toward the Moon's centre), from celestial north through east. */
  positionAngleDeg: number;
}

export interface LocalCircumstances {
  kind: LocalEclipseKind;
  firstContact: ContactEvent;
  secondContact: ContactEvent | null;
  maximum: ContactEvent;
  thirdContact: ContactEvent | null;
  fourthContact: ContactEvent;
  /** Fraction of the Sun's diameter covered at maximum (above 1 in a total eclipse), mean lunar limb. */
  magnitude: number;
  /** Fraction of the Sun's disk area covered at maximum (1 in a total eclipse). */
  obscuration: number;
  /** Apparent diameter of the Moon (mean limb) over that of the Sun at maximum. */
  moonSunDiameterRatio: number;
  /** Third minus second contact, seconds: totality or annularity; null when partial. */
  centralDurationS: number | null;
  /** astronomy-engine's own contact times (mean lunar radius, 1737.4 km), kept for comparison. */
  engineContactsUtcMs: { first: number; second: number | null; maximum: number; third: number | null; fourth: number };
}

const MS_PER_MIN = 60_000;
const BISECTION_TOLERANCE_MS = 1;
/** Partial phases last at most about four hours at one place; this bracket safely holds first and fourth contact. */
const OUTER_BRACKET_MS = 5 * 60 * MS_PER_MIN;
/** Central phases last at most about 12.5 minutes (annular); half of that and a margin either side of maximum. */
const INNER_BRACKET_MS = 15 * MS_PER_MIN;

interface Disks {
  separationArcsec: number;
  sunArcsec: number;
  moonMeanArcsec: number;
  moonUmbralArcsec: number;
}

/** Where the observer is at an instant: constant for a fixed site, interpolated along a track for a moving one. */
type SiteAt = (utcMs: number) => SiteLocation;

function measureDisks(siteAt: SiteAt, utcMs: number): Disks {
  const time: AstroTime = makeAstroTime(utcMs);
  const v = computeTopocentricVectors(time, makeObserver(siteAt(utcMs)));
  const moonKm = Math.hypot(v.moon.x, v.moon.y, v.moon.z) * KM_PER_AU;
  return {
    separationArcsec: computeSeparationArcsec(v.sun, v.moon),
    sunArcsec: computeSunSemiDiameterArcsec(Math.hypot(v.sun.x, v.sun.y, v.sun.z)),
    moonMeanArcsec: computeMoonSemiDiameterArcsec(moonKm, MOON_K_MEAN),
    moonUmbralArcsec: computeMoonSemiDiameterArcsec(moonKm, MOON_K_UMBRAL),
  };
}

const outerGap = (d: Disks) => d.separationArcsec - (d.moonMeanArcsec + d.sunArcsec);
const innerGap = (d: Disks) => d.separationArcsec - Math.abs(d.moonUmbralArcsec - d.sunArcsec);

/** Root of f between a and b (f(a), f(b) of opposite sign) by bisection to 1 ms. */
function bisect(f: (ms: number) => number, aMs: number, bMs: number, what: string): number {
  let fa = f(aMs);
  const fb = f(bMs);
  if (Math.sign(fa) === Math.sign(fb)) {
    throw new AstroError("not-found", `could not bracket ${what}: the eclipse geometry did not change sign in the search window`);
  }
  let lo = aMs;
  let hi = bMs;
  while (hi - lo > BISECTION_TOLERANCE_MS) {
    const mid = (lo + hi) / 2;
    const fm = f(mid);
    if (Math.sign(fm) === Math.sign(fa)) {
      lo = mid;
      fa = fm;
    } else {
      hi = mid;
    }
  }
  return (lo + hi) / 2;
}

/** Instant of least separation by golden-section search to 10 ms (separation is unimodal over the bracket). */
function minimizeSeparation(siteAt: SiteAt, aMs: number, bMs: number): number {
  return findMinimumByGoldenSection((ms) => measureDisks(siteAt, ms).separationArcsec, aMs, bMs, 10).x;
}

/** Area of the Sun's disk (radius a) covered by the Moon's (radius b) at centre distance c, as a fraction. */
export function computeObscuration(sunArcsec: number, moonArcsec: number, separationArcsec: number): number {
  const a = sunArcsec;
  const b = moonArcsec;
  const c = separationArcsec;
  if (c >= a + b) return 0;
  if (c <= Math.abs(a - b)) return b >= a ? 1 : (b * b) / (a * a);
  // Two circular segments cut by the common chord (standard lens area).
  const alpha = Math.acos((c * c + a * a - b * b) / (2 * c * a));
  const beta = Math.acos((c * c + b * b - a * a) / (2 * c * b));
  const lens = a * a * (alpha - Math.sin(2 * alpha) / 2) + b * b * (beta - Math.sin(2 * beta) / 2);
  return lens / (Math.PI * a * a);
}

function describeEvent(siteAt: SiteAt, utcMs: number, limbSide: "toward-moon" | "away-from-moon"): ContactEvent {
  const s = computeSunMoonState(siteAt(utcMs), utcMs);
  let pa = (Math.atan2(s.moonMinusSun.eastArcsec, s.moonMinusSun.northArcsec) * 180) / Math.PI;
  if (limbSide === "away-from-moon") pa += 180;
  pa = ((pa % 360) + 360) % 360;
  return { utcMs, sunAltDeg: s.sun.altDeg, sunApparentAltDeg: s.sun.apparentAltDeg, sunAzDeg: s.sun.azDeg, positionAngleDeg: pa };
}

/**
 * The next solar eclipse seen from the site (the Sun up at its start or end) after the instant,
 * with contacts refined for the published lunar radii. Throws not-found if none comes within
 * astronomy-engine's search (it searches forward without limit, so this means a model fault).
 */
export function findNextLocalCircumstances(site: SiteLocation, searchFromUtcMs: number): LocalCircumstances {
  return computeCircumstances(() => site, site, searchFromUtcMs);
}

/**
 * Search with astronomy-engine from one place (searchSite), then refine every contact with
 * the observer where siteAt puts it at that instant.
 */
function computeCircumstances(siteAt: SiteAt, searchSite: SiteLocation, searchFromUtcMs: number): LocalCircumstances {
  validateUtcMs(searchFromUtcMs, "searchFromUtcMs");
  const engine = SearchLocalSolarEclipse(makeAstroTime(searchFromUtcMs), makeObserver(searchSite));
  const enginePeakMs = convertAstroTimeToUtcMs(engine.peak.time);
  const f = (ms: number) => measureDisks(siteAt, ms);

  const maxMs = minimizeSeparation(siteAt, enginePeakMs - 20 * MS_PER_MIN, enginePeakMs + 20 * MS_PER_MIN);
  const atMax = f(maxMs);
  const firstMs = bisect((ms) => outerGap(f(ms)), maxMs - OUTER_BRACKET_MS, maxMs, "first contact");
  const fourthMs = bisect((ms) => outerGap(f(ms)), maxMs, maxMs + OUTER_BRACKET_MS, "fourth contact");

  let kind: LocalEclipseKind = "partial";
  let secondMs: number | null = null;
  let thirdMs: number | null = null;
  if (innerGap(atMax) < 0) {
    kind = atMax.moonUmbralArcsec > atMax.sunArcsec ? "total" : "annular";
    secondMs = bisect((ms) => innerGap(f(ms)), maxMs - INNER_BRACKET_MS, maxMs, "second contact");
    thirdMs = bisect((ms) => innerGap(f(ms)), maxMs, maxMs + INNER_BRACKET_MS, "third contact");
  }
  const innerSide = kind === "total" ? "away-from-moon" : "toward-moon";
  const obscuration = kind === "total" ? 1 : computeObscuration(atMax.sunArcsec, atMax.moonMeanArcsec, atMax.separationArcsec);

  return {
    kind,
    firstContact: describeEvent(siteAt, firstMs, "toward-moon"),
    secondContact: secondMs === null ? null : describeEvent(siteAt, secondMs, innerSide),
    maximum: describeEvent(siteAt, maxMs, "toward-moon"),
    thirdContact: thirdMs === null ? null : describeEvent(siteAt, thirdMs, innerSide),
    fourthContact: describeEvent(siteAt, fourthMs, "toward-moon"),
    magnitude: (atMax.sunArcsec + atMax.moonMeanArcsec - atMax.separationArcsec) / (2 * atMax.sunArcsec),
    obscuration,
    moonSunDiameterRatio: atMax.moonMeanArcsec / atMax.sunArcsec,
    centralDurationS: secondMs === null || thirdMs === null ? null : (thirdMs - secondMs) / 1000,
    engineContactsUtcMs: {
      first: convertAstroTimeToUtcMs(engine.partial_begin.time),
      second: engine.total_begin ? convertAstroTimeToUtcMs(engine.total_begin.time) : null,
      maximum: enginePeakMs,
      third: engine.total_end ? convertAstroTimeToUtcMs(engine.total_end.time) : null,
      fourth: convertAstroTimeToUtcMs(engine.partial_end.time),
    },
  };
}

function requireWindowDays(windowDays: number): number {
  if (!(windowDays > 0 && windowDays <= 15)) {
    throw new AstroError("bad-parameter", `windowDays must be in (0, 15], got ${String(windowDays)}`, "windowDays");
  }
  return windowDays * 86_400_000;
}

function requireNear(found: LocalCircumstances, nearUtcMs: number, windowMs: number, where: string): LocalCircumstances {
  if (Math.abs(found.maximum.utcMs - nearUtcMs) > windowMs) {
    const day = new Date(nearUtcMs).toISOString().slice(0, 10);
    throw new AstroError("not-found", `no solar eclipse is visible from ${where} within ${windowMs / 86_400_000} days of ${day}`, "site");
  }
  return found;
}

/**
 * Local circumstances of the eclipse whose maximum falls within windowDays of the given date
 * (for example the catalogue date of an eclipse). Throws not-found, naming the site and the
 * dates, when the site sees no eclipse then.
 */
export function findLocalCircumstances(site: SiteLocation, nearUtcMs: number, windowDays = 2): LocalCircumstances {
  validateUtcMs(nearUtcMs, "nearUtcMs");
  const windowMs = requireWindowDays(windowDays);
  const found = findNextLocalCircumstances(site, nearUtcMs - windowMs);
  return requireNear(found, nearUtcMs, windowMs, `latitude ${site.latDeg}, longitude ${site.lonDeg}`);
}

/**
 * The same for a moving site (a ship or an aircraft): each contact is computed where the track
 * puts the observer at that instant. Before its first point and after its last the site is
 * taken to rest at that end, so a track that covers only totality still gives first and fourth
 * contact (from a position that may be off by the distance travelled).
 */
export function findLocalCircumstancesOnTrack(points: readonly TrackPoint[], nearUtcMs: number, windowDays = 2): LocalCircumstances {
  validateUtcMs(nearUtcMs, "nearUtcMs");
  const windowMs = requireWindowDays(windowDays);
  if (!Array.isArray(points) || points.length === 0) {
    throw new AstroError("bad-parameter", "the track has no points", "track");
  }
  const first = points[0].timeMs;
  const last = points[points.length - 1].timeMs;
  const siteAt: SiteAt = (ms) => interpolateTrack(points, Math.min(last, Math.max(first, ms)), 0);
  const searchSite = siteAt(nearUtcMs);
  const found = computeCircumstances(siteAt, searchSite, nearUtcMs - windowMs);
  return requireNear(found, nearUtcMs, windowMs, `the track near latitude ${searchSite.latDeg.toFixed(2)}, longitude ${searchSite.lonDeg.toFixed(2)}`);
}
