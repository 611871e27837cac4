// Helioprojective WCS of the master (Thompson 2006, A&A 449:791, "Coordinate
// systems for solar image data"): HPLN-TAN / HPLT-TAN in arcsec, CRVAL (0, 0) at
// the Sun's centre, so theta_x (HPLN) grows toward solar west and theta_y (HPLT)
// toward solar north.
//
// How rows are stored: the FITS writer (lib/media) writes our row-major planes as
// they are, so array row y (0 = the top row of every PNG, preview and tile) is FITS
// row j = y + 1 and column x is i = x + 1. FITS pixel j therefore grows DOWN the
// picture, and a viewer that draws row 1 at the bottom shows the master upside
// down next to our renditions; the WCS below follows the rows as stored, so world
// coordinates (and solar north) are right in any WCS-aware reader.
//
// With alpha the position angle of solar north in the image (counter-clockwise
// from image up; alpha = north angle + P, sun-geometry.ts), solar north points
// along (-sin alpha, -cos alpha) in (x, y) and solar west along (cos alpha, -sin alpha):
//   HPLN = s (cos(alpha) di - sin(alpha) dj),  HPLT = s (-sin(alpha) di - cos(alpha) dj)
// for (di, dj) from CRPIX. We write CDELT1 = CDELT2 = s and that matrix as PC
// (WCS Paper I, Greisen and Calabretta 2002, eq. 3); its determinant is -1 because
// rows run downward. CROTA2 is not written: one rotation convention only.
import type { FitsCard } from "@/lib/media";
import type { SiteLocation } from "@/lib/astro";

const DEG = Math.PI / 180;
/** IAU 2015 Resolution B3 nominal solar radius, m (the reference radius of Thompson 2006's RSUN_REF). */
export const RSUN_REF_M = 695_700_000;
/** WGS 84 ellipsoid: semi-major axis (m) and flattening. */
const WGS84_A_M = 6_378_137;
const WGS84_F = 1 / 298.257223563;

export interface HelioGeometry {
  /** Sun's centre in master pixels, 0-based centres (x right, y down). */
  sunCentrePx: { x: number; y: number };
  plateScaleArcsecPerPx: number;
  /** Position angle of celestial north in the image, counter-clockwise from up. */
  northAngleDeg: number;
  /** Position angle of the Sun's axis (Meeus ch. 29) at the reference instant. */
  pAngleDeg: number;
  /** Apparent solar radius (959.63 arcsec at 1 au) and observer-Sun distance at the reference instant. */
  rsunObsArcsec: number;
  dsunObsM: number;
  observer: SiteLocation;
  /** Instant the master's Moon silhouette shows: the reference frame's mid-exposure, UTC ms. */
  moonSilhouetteMs: number;
}

/** Position angle of solar north in the image, degrees counter-clockwise from image up, in [0, 360). */
export function computeSolarNorthAngleDeg(g: Pick<HelioGeometry, "northAngleDeg" | "pAngleDeg">): number {
  return (((g.northAngleDeg + g.pAngleDeg) % 360) + 360) % 360;
}

/** Apparent solar radius in master pixels. */
export function computeSunRadiusPx(g: Pick<HelioGeometry, "rsunObsArcsec" | "plateScaleArcsecPerPx">): number {
  return g.rsunObsArcsec / g.plateScaleArcsecPerPx;
}

/**
 * Earth-centred, Earth-fixed position of a geodetic site on WGS 84, m (the
 * OBSGEO-X/Y/Z of WCS Paper VII, Rots et al. 2015, section 4.1.3):
 * X = (N + h) cos(phi) cos(lambda), Y = (N + h) cos(phi) sin(lambda), Z = (N (1 - e^2) + h) sin(phi),
 * N = a / sqrt(1 - e^2 sin^2(phi)). The site's elevation is taken as the height above
 * the ellipsoid; a track's height above the geoid differs by under 110 m, nothing at 1 au.
 */
export function computeObsGeoM(site: SiteLocation): { x: number; y: number; z: number } {
  const e2 = WGS84_F * (2 - WGS84_F);
  const phi = site.latDeg * DEG;
  const lambda = site.lonDeg * DEG;
  const n = WGS84_A_M / Math.sqrt(1 - e2 * Math.sin(phi) ** 2);
  const h = site.elevationM;
  return {
    x: (n + h) * Math.cos(phi) * Math.cos(lambda),
    y: (n + h) * Math.cos(phi) * Math.sin(lambda),
    z: (n * (1 - e2) + h) * Math.sin(phi),
  };
}

function round(value: number, digits: number): number {
  return Number(value.toFixed(digits));
}

/** ISO 8601 with milliseconds and no zone letter (FITS 4.0 section 9.1.1). */
function formatFitsDateTime(ms: number): string {
  return new Date(ms).toISOString().replace(/Z$/, "");
}

/** The WCS and observer cards; `dateObsMs` is the start of the first exposure. */
export function buildHelioWcsCards(g: HelioGeometry, dateObsMs: number): FitsCard[] {
  const alpha = computeSolarNorthAngleDeg(g) * DEG;
  const c = Math.cos(alpha);
  const s = Math.sin(alpha);
  const geo = computeObsGeoM(g.observer);
  // Trim -0 and float noise so the cards read cleanly; 12 decimals keep 1e-12 rad.
  const pc = (v: number) => round(v, 12) + 0;
  return [
    { key: "WCSNAME", value: "Helioprojective-cartesian", comment: "Thompson 2006, A&A 449:791" },
    { key: "CTYPE1", value: "HPLN-TAN", comment: "helioprojective longitude, toward solar west" },
    { key: "CTYPE2", value: "HPLT-TAN", comment: "helioprojective latitude, toward solar north" },
    { key: "CUNIT1", value: "arcsec" },
    { key: "CUNIT2", value: "arcsec" },
    { key: "CRPIX1", value: round(g.sunCentrePx.x + 1, 4), real: true, comment: "Sun centre, FITS pixels (1-based)" },
    { key: "CRPIX2", value: round(g.sunCentrePx.y + 1, 4), real: true, comment: "Sun centre; rows are stored top row first" },
    { key: "CRVAL1", value: 0, real: true, comment: "[arcsec]" },
    { key: "CRVAL2", value: 0, real: true, comment: "[arcsec]" },
    { key: "CDELT1", value: round(g.plateScaleArcsecPerPx, 8), real: true, comment: "[arcsec/pixel] plate scale" },
    { key: "CDELT2", value: round(g.plateScaleArcsecPerPx, 8), real: true, comment: "[arcsec/pixel] plate scale" },
    { key: "PC1_1", value: pc(c), real: true, comment: "solar north at SOLARNA ccw from image up" },
    { key: "PC1_2", value: pc(-s), real: true },
    { key: "PC2_1", value: pc(-s), real: true },
    { key: "PC2_2", value: pc(-c), real: true, comment: "negative: FITS rows run down the image" },
    { key: "DATE-OBS", value: formatFitsDateTime(dateObsMs), comment: "start of the first exposure, UTC" },
    { key: "DSUN_OBS", value: round(g.dsunObsM, 0), real: true, comment: "[m] observer to Sun centre" },
    { key: "RSUN_OBS", value: round(g.rsunObsArcsec, 4), real: true, comment: "[arcsec] apparent solar radius (959.63 at 1 au)" },
    { key: "RSUN_REF", value: RSUN_REF_M, real: true, comment: "[m] IAU 2015 nominal solar radius" },
    { key: "OBSGEO-X", value: round(geo.x, 2), real: true, comment: "[m] observer, ITRS (WGS 84)" },
    { key: "OBSGEO-Y", value: round(geo.y, 2), real: true, comment: "[m] observer, ITRS (WGS 84)" },
    { key: "OBSGEO-Z", value: round(geo.z, 2), real: true, comment: "[m] observer, ITRS (WGS 84)" },
    { key: "SOLAR_P", value: round(g.pAngleDeg, 4), real: true, comment: "[deg] P angle of the Sun's axis" },
    { key: "NORTHANG", value: round(g.northAngleDeg, 4), real: true, comment: "[deg] celestial north, ccw from image up" },
    { key: "SOLARNA", value: round(computeSolarNorthAngleDeg(g), 4), real: true, comment: "[deg] solar north, ccw from image up" },
    { key: "SUNR", value: round(computeSunRadiusPx(g), 3), real: true, comment: "[pixel] apparent solar radius" },
    { key: "MOONDATE", value: formatFitsDateTime(g.moonSilhouetteMs), comment: "instant the Moon silhouette shows, UTC" },
  ];
}
