// The list of solar eclipses between two years, from astronomy-engine's global
// search. astronomy-engine classifies an eclipse by what is seen where the
// shadow axis meets the Earth at greatest eclipse (total, annular or partial).
// A hybrid eclipse is total there but annular where the path meets the
// sunrise and sunset terminators, because the Earth's surface curves away from
// the Moon: we test the umbral cone at both ends of the central line, with the
// Moon's umbral radius (k = 0.272281) and the Sun's 959.63 arcsec at 1 au.
import {
  AstroTime,
  Body,
  EclipseKind,
  GeoMoon,
  GeoVector,
  GlobalSolarEclipseInfo,
  KM_PER_AU,
  NextGlobalSolarEclipse,
  RotateVector,
  Rotation_EQJ_EQD,
  SearchGlobalSolarEclipse,
} from "astronomy-engine";
import { AstroError } from "./errors";
import { EARTH_EQUATORIAL_RADIUS_KM, MOON_K_UMBRAL, SUN_SEMI_DIAMETER_1AU_ARCSEC } from "./positions";
import { convertAstroTimeToUtcMs, makeAstroTime } from "./site-time";

export type CatalogueEclipseKind = "total" | "annular" | "hybrid" | "partial";

export interface CatalogueEclipse {
  /** Date of greatest eclipse in UTC, YYYY-MM-DD: a readable, stable id. */
  dateIso: string;
  peakUtcMs: number;
  kind: CatalogueEclipseKind;
  /** Where the shadow axis meets the Earth at greatest eclipse; null when the axis misses it. */
  peakLatDeg: number | null;
  peakLonDeg: number | null;
  /** Least distance of the shadow axis from the Earth's centre, km. */
  axisDistanceKm: number;
}

/** WGS 84 polar over equatorial radius, to make the Earth a sphere by stretching z. */
const EARTH_AXIS_RATIO = 1 - 1 / 298.257223563;
const MOON_UMBRAL_RADIUS_KM = MOON_K_UMBRAL * EARTH_EQUATORIAL_RADIUS_KM;
const SUN_RADIUS_KM = (SUN_SEMI_DIAMETER_1AU_ARCSEC / 206_264.80624709636) * KM_PER_AU;
/** The shadow axis crosses the Earth in at most about 3.5 hours; this window holds both ends. */
const AXIS_SEARCH_HALF_WINDOW_DAYS = 5 / 24;

interface AxisHit {
  /** Umbral cone radius where the axis meets the surface, km: positive total, negative annular. */
  umbraRadiusKm: number;
}

/** Where the shadow axis meets the Earth (in equator-of-date coordinates, z stretched): the umbral radius there, or null on a miss. */
function intersectShadowAxis(time: AstroTime): AxisHit | null {
  const rot = Rotation_EQJ_EQD(time);
  const s = RotateVector(rot, GeoVector(Body.Sun, time, true));
  const m = RotateVector(rot, GeoMoon(time));
  const mk = [m.x * KM_PER_AU, m.y * KM_PER_AU, (m.z * KM_PER_AU) / EARTH_AXIS_RATIO];
  const dRaw = [(m.x - s.x) * KM_PER_AU, (m.y - s.y) * KM_PER_AU, ((m.z - s.z) * KM_PER_AU) / EARTH_AXIS_RATIO];
  const sunMoonKm = Math.hypot(m.x - s.x, m.y - s.y, m.z - s.z) * KM_PER_AU;
  const len = Math.hypot(dRaw[0], dRaw[1], dRaw[2]);
  const d = dRaw.map((c) => c / len);
  // |mk + lambda d|^2 = R^2, nearer root: the sunward side of the Earth.
  const b = mk[0] * d[0] + mk[1] * d[1] + mk[2] * d[2];
  const c = mk[0] * mk[0] + mk[1] * mk[1] + mk[2] * mk[2] - EARTH_EQUATORIAL_RADIUS_KM ** 2;
  const disc = b * b - c;
  if (disc < 0) return null;
  const lambdaKm = -b - Math.sqrt(disc);
  // Umbral cone: radius shrinks by (R_sun - R_moon) / (Sun-Moon distance) per km behind the Moon.
  return { umbraRadiusKm: MOON_UMBRAL_RADIUS_KM - (lambdaKm * (SUN_RADIUS_KM - MOON_UMBRAL_RADIUS_KM)) / sunMoonKm };
}

/** Umbral radius at one end of the central line (the axis grazing the Earth), found by bisection to 1 s. */
function findAxisEndUmbraKm(peak: AstroTime, direction: 1 | -1): number {
  let inside = 0;
  let outside = direction * AXIS_SEARCH_HALF_WINDOW_DAYS;
  if (intersectShadowAxis(peak.AddDays(outside)) !== null) {
    throw new AstroError("not-found", `the shadow axis of the eclipse of ${peak.toString()} still meets the Earth 5 hours from greatest eclipse`);
  }
  while (Math.abs(outside - inside) > 1 / 86_400) {
    const mid = (inside + outside) / 2;
    if (intersectShadowAxis(peak.AddDays(mid)) === null) outside = mid;
    else inside = mid;
  }
  return (intersectShadowAxis(peak.AddDays(inside)) as AxisHit).umbraRadiusKm;
}

function classify(info: GlobalSolarEclipseInfo): CatalogueEclipseKind {
  if (info.kind === EclipseKind.Annular) return "annular";
  if (info.kind !== EclipseKind.Total) return "partial";
  const startsAnnular = findAxisEndUmbraKm(info.peak, -1) < 0;
  const endsAnnular = findAxisEndUmbraKm(info.peak, 1) < 0;
  return startsAnnular || endsAnnular ? "hybrid" : "total";
}

function describe(info: GlobalSolarEclipseInfo): CatalogueEclipse {
  const peakUtcMs = convertAstroTimeToUtcMs(info.peak);
  const central = info.latitude !== undefined && info.longitude !== undefined;
  return {
    dateIso: new Date(peakUtcMs).toISOString().slice(0, 10),
    peakUtcMs,
    kind: classify(info),
    peakLatDeg: central ? (info.latitude as number) : null,
    peakLonDeg: central ? (info.longitude as number) : null,
    axisDistanceKm: info.distance,
  };
}

/**
 * Every solar eclipse whose greatest eclipse falls in the years fromYear to toYear inclusive
 * (UTC), in time order. Limitation: an eclipse whose shadow axis misses the Earth while the
 * umbra still touches it (non-central total or annular, a few per century) is reported as
 * partial, as astronomy-engine classifies it.
 */
export function listSolarEclipses(fromYear: number, toYear: number): CatalogueEclipse[] {
  for (const [field, year] of [["fromYear", fromYear], ["toYear", toYear]] as const) {
    if (!Number.isInteger(year) || year < 1700 || year > 2400) {
      throw new AstroError("bad-parameter", `${field} must be a whole year from 1700 to 2400, got ${String(year)}`, field);
    }
  }
  if (toYear < fromYear) {
    throw new AstroError("bad-parameter", `toYear (${toYear}) must not be before fromYear (${fromYear})`, "toYear");
  }
  if (toYear - fromYear > 200) {
    throw new AstroError("bad-parameter", `ask for at most 200 years at a time, got ${toYear - fromYear + 1}`, "toYear");
  }
  const endMs = Date.UTC(toYear + 1, 0, 1);
  const list: CatalogueEclipse[] = [];
  let info = SearchGlobalSolarEclipse(makeAstroTime(Date.UTC(fromYear, 0, 1)));
  while (convertAstroTimeToUtcMs(info.peak) < endMs) {
    list.push(describe(info));
    info = NextGlobalSolarEclipse(info.peak);
  }
  return list;
}
