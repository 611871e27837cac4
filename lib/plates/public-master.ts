// The public copy of a reduction's master.fits: the observer's position only at
// the site's precision. The stored master keeps the exact site (the owner and
// curators download it from the reduction page); the public files route
// rewrites the header cards on the way out, from the current precision, so a
// site made "hidden" after publication is honoured at once. Only the header
// changes: the data unit is streamed on byte for byte, so the WCS (which does
// not depend on the observer's place) and every pixel stay as they were.
import type { LocationPrecision } from "@/db/schema";
import { cardKey, cardNumber, findFitsHeaderLength, formatCards, joinFitsHeader, splitFitsHeader } from "@/lib/media/fits-header-edit";
import { computeObsGeoM } from "@/lib/reduction-runner/helio-wcs";
import { toPublicObserver, type ObserverPlace } from "@/lib/sites/precision";

/** Cards that state where the observer stood (ours, WCS Paper VII's, and common observatory keywords). */
export const OBSERVER_PLACE_KEYS = new Set([
  "OBSGEO-X", "OBSGEO-Y", "OBSGEO-Z", "OBSGEO-B", "OBSGEO-L", "OBSGEO-H",
  "SITELAT", "SITELONG", "SITEELEV", "LATITUDE", "LONGITUD", "ALTITUDE",
  "OBS-LAT", "OBS-LONG", "OBS-ELEV", "OBSLAT", "OBSLON", "OBSALT", "GEOLAT", "GEOLON",
]);

/**
 * The observer's distance from the Sun differs by up to an Earth radius with the
 * place on Earth, so DSUN_OBS to the metre (and RSUN_OBS, its angle) would say
 * how far along the Sun's direction the observer stood. Public copies carry
 * them at steps no finer than the precision: 10 km for rounded (0.0001 arcsec of
 * RSUN_OBS is about 15 km); for hidden, 10 000 km and 0.1 arcsec (about 15 600
 * km), more than the Earth's diameter.
 */
const COARSE_STEPS: Record<"rounded" | "hidden", { dsunM: number; rsunDecimals: number }> = {
  rounded: { dsunM: 1e4, rsunDecimals: 4 },
  hidden: { dsunM: 1e7, rsunDecimals: 1 },
};

const DEG = 180 / Math.PI;
const WGS84_A_M = 6_378_137;
const WGS84_F = 1 / 298.257223563;

/**
 * Geodetic latitude, longitude and height on WGS 84 from Earth-centred X, Y, Z
 * (the inverse of computeObsGeoM), by fixed-point iteration on the latitude,
 * which converges to well under a millimetre in a few steps near the surface.
 */
export function geodeticFromObsGeo(x: number, y: number, z: number): ObserverPlace {
  const e2 = WGS84_F * (2 - WGS84_F);
  const p = Math.hypot(x, y);
  let phi = Math.atan2(z, p * (1 - e2));
  let h = 0;
  for (let i = 0; i < 8; i++) {
    const n = WGS84_A_M / Math.sqrt(1 - e2 * Math.sin(phi) ** 2);
    h = p / Math.cos(phi) - n;
    phi = Math.atan2(z, p * (1 - (e2 * n) / (n + h)));
  }
  return { latDeg: phi * DEG, lonDeg: Math.atan2(y, x) * DEG, elevationM: h };
}

/** The header cards of the public copy for a site of this precision (80-character cards, END excluded). */
export function toPublicMasterCards(cards: string[], precision: LocationPrecision): string[] {
  if (precision === "exact") return cards;
  const geo = new Map(cards.map((c) => [cardKey(c), cardNumber(c)]));
  const gx = geo.get("OBSGEO-X");
  const gy = geo.get("OBSGEO-Y");
  const gz = geo.get("OBSGEO-Z");
  const at = cards.findIndex((c) => OBSERVER_PLACE_KEYS.has(cardKey(c)));
  const steps = COARSE_STEPS[precision];
  const kept = cards
    .filter((c) => !OBSERVER_PLACE_KEYS.has(cardKey(c)))
    .map((c) => {
      const key = cardKey(c);
      const value = cardNumber(c);
      if (value === undefined) return c;
      if (key === "DSUN_OBS") return formatCards([{ key, value: Math.round(value / steps.dsunM) * steps.dsunM, real: true, comment: `[m] observer to Sun, to ${steps.dsunM / 1000} km for publication` }])[0];
      if (key === "RSUN_OBS") return formatCards([{ key, value: Number(value.toFixed(steps.rsunDecimals)), real: true, comment: "[arcsec] apparent solar radius, rounded for publication" }])[0];
      return c;
    });
  const added: string[] = [];
  if (precision === "rounded" && gx !== undefined && gy !== undefined && gz !== undefined) {
    const shown = toPublicObserver(geodeticFromObsGeo(gx, gy, gz), "rounded")!;
    const g = computeObsGeoM(shown);
    added.push(
      ...formatCards([
        { key: "OBSGEO-X", value: Math.round(g.x), real: true, comment: "[m] observer, rounded (see COMMENT)" },
        { key: "OBSGEO-Y", value: Math.round(g.y), real: true, comment: "[m] observer, rounded (see COMMENT)" },
        { key: "OBSGEO-Z", value: Math.round(g.z), real: true, comment: "[m] observer, rounded (see COMMENT)" },
        { key: "LOCPREC", value: "rounded", comment: "observer position precision in this copy" },
        { key: "COMMENT", comment: `Public copy: the observer's position is rounded to ${shown.latDeg.toFixed(1)} deg, ${shown.lonDeg.toFixed(1)} deg (a 0.1 deg grid, about 10 km) and 100 m of height, as the photographer chose. The WCS does not depend on it.` },
      ]),
    );
  } else if (precision === "rounded") {
    added.push(...formatCards([{ key: "LOCPREC", value: "rounded", comment: "observer position precision; none is given here" }]));
  } else {
    added.push(
      ...formatCards([
        { key: "LOCPREC", value: "hidden", comment: "observer position precision in this copy" },
        { key: "COMMENT", comment: "Public copy: the observer's position is withheld, as the photographer chose; DSUN_OBS and RSUN_OBS are coarsened so they do not reveal it. The WCS does not depend on it." },
      ]),
    );
  }
  const insertAt = at >= 0 ? Math.min(at, kept.length) : kept.length;
  return [...kept.slice(0, insertAt), ...added, ...kept.slice(insertAt)];
}

/** The most header we read before giving up: 100 blocks, far more than any master of ours has. */
const MAX_HEADER_BYTES = 100 * 2880;

/**
 * The stored master streamed with its header rewritten for the public. Returns
 * the new stream and the change in length (the header may gain or lose a block).
 */
export async function streamPublicMaster(body: ReadableStream<Uint8Array>, precision: LocationPrecision): Promise<{ stream: ReadableStream<Uint8Array>; lengthDelta: number }> {
  const reader = body.getReader();
  let buffered = new Uint8Array(0);
  let headerLength: number | null = null;
  // Read until the whole header (END and the rest of its block) is in hand.
  while (headerLength === null || buffered.length < headerLength) {
    const { done, value } = await reader.read();
    if (done) break;
    const next = new Uint8Array(buffered.length + value.length);
    next.set(buffered);
    next.set(value, buffered.length);
    buffered = next;
    headerLength ??= findFitsHeaderLength(buffered);
    if (headerLength === null && buffered.length > MAX_HEADER_BYTES) break;
  }
  if (headerLength === null || headerLength > buffered.length) {
    await reader.cancel();
    throw new Error("master.fits: no END card in the first 100 header blocks");
  }
  const header = joinFitsHeader(toPublicMasterCards(splitFitsHeader(buffered.subarray(0, headerLength)), precision));
  const rest = buffered.subarray(headerLength);
  const stream = new ReadableStream<Uint8Array>({
    start(controller) {
      controller.enqueue(header);
      if (rest.length) controller.enqueue(rest);
    },
    async pull(controller) {
      const { done, value } = await reader.read();
      if (done) controller.close();
      else controller.enqueue(value);
    },
    cancel(reason) {
      return reader.cancel(reason);
    },
  });
  return { stream, lengthDelta: header.length - headerLength };
}
