// Pure geometry of the viewer's overlays: rings in solar radii, solar north and
// east, scale bars, and the mapping from image pixels to screen pixels. No DOM,
// no OpenSeadragon: the component feeds it the current image-to-screen mapping.
import type { OverlayKey, ViewerGeometry } from "./types";

export interface Vec2 {
  x: number;
  y: number;
}

/**
 * The affine map from image pixels to viewer-element pixels:
 * screen = origin + x * xAxis + y * yAxis. Pan, zoom and rotation of the viewer
 * all live in it, so everything projected through it stays right under rotation.
 */
export interface ImageToScreen {
  origin: Vec2;
  xAxis: Vec2;
  yAxis: Vec2;
}

export function projectPoint(t: ImageToScreen, p: Vec2): Vec2 {
  return { x: t.origin.x + p.x * t.xAxis.x + p.y * t.yAxis.x, y: t.origin.y + p.x * t.xAxis.y + p.y * t.yAxis.y };
}

/** Direction on screen of an image-space vector (linear part only), unit length. */
export function projectDirection(t: ImageToScreen, v: Vec2): Vec2 {
  return normalize({ x: v.x * t.xAxis.x + v.y * t.yAxis.x, y: v.x * t.xAxis.y + v.y * t.yAxis.y });
}

/** Screen pixels per image pixel; the map is a similarity, so the root of |det| is its scale. */
export function screenPxPerImagePx(t: ImageToScreen): number {
  return Math.sqrt(Math.abs(t.xAxis.x * t.yAxis.y - t.xAxis.y * t.yAxis.x));
}

function normalize(v: Vec2): Vec2 {
  const n = Math.hypot(v.x, v.y);
  return n > 0 ? { x: v.x / n, y: v.y / n } : { x: 0, y: 0 };
}

/** Multiples of the solar radius that the rings mark. */
export const RING_MULTIPLES = [1, 2, 3, 4] as const;

/** Ring radii in image pixels: 1, 2, 3 and 4 solar radii about the Sun's centre. */
export function computeRingRadiiPx(sunRadiusPx: number): number[] {
  if (!(sunRadiusPx > 0)) throw new RangeError(`sunRadiusPx must be positive, got ${sunRadiusPx}`);
  return RING_MULTIPLES.map((k) => k * sunRadiusPx);
}

/**
 * Solar north and east as unit vectors in image coordinates (x right, y down).
 * The angle is counter-clockwise from image up as seen on screen, so with y down
 * north = (-sin a, -cos a); east is north turned a further 90 degrees
 * counter-clockwise (an unmirrored sky image: east is left of north when north
 * is up), east = (-cos a, sin a).
 */
export function computeNorthEastVectors(solarNorthAngleDeg: number): { north: Vec2; east: Vec2 } {
  if (!Number.isFinite(solarNorthAngleDeg)) throw new RangeError(`solarNorthAngleDeg must be finite, got ${solarNorthAngleDeg}`);
  const a = (solarNorthAngleDeg * Math.PI) / 180;
  const clean = (v: number) => (Math.abs(v) < 1e-12 ? 0 : v);
  return {
    north: { x: clean(-Math.sin(a)), y: clean(-Math.cos(a)) },
    east: { x: clean(-Math.cos(a)), y: clean(Math.sin(a)) },
  };
}

/** The solar radius as an angle: radius in pixels times the plate scale, in arcminutes. */
export function solarRadiusArcmin(sunRadiusPx: number, plateScaleArcsecPerPx: number): number {
  if (!(sunRadiusPx > 0) || !(plateScaleArcsecPerPx > 0)) throw new RangeError("sunRadiusPx and plateScaleArcsecPerPx must be positive");
  return (sunRadiusPx * plateScaleArcsecPerPx) / 60;
}

/** Arcminutes to solar radii for this plate. */
export function arcminToSolarRadii(arcmin: number, sunRadiusPx: number, plateScaleArcsecPerPx: number): number {
  return arcmin / solarRadiusArcmin(sunRadiusPx, plateScaleArcsecPerPx);
}

/** The share of the viewer's width a scale bar may take (common practice for map scale bars). */
export const SCALE_BAR_MIN_FRACTION = 0.15;
export const SCALE_BAR_MAX_FRACTION = 0.4;

/**
 * Round lengths of arc in arcseconds: 1-2-5 steps with the sexagesimal 15, 20
 * and 30 of seconds and minutes, then degrees. Neighbours differ by at most a
 * factor of 2.5, which is what keeps the bar inside 15 to 40 % of the width.
 */
const ARC_LADDER_ARCSEC: number[] = [
  ...[0.01, 0.02, 0.05, 0.1, 0.2, 0.5],
  ...[1, 2, 5, 10, 15, 20, 30],
  ...[1, 2, 5, 10, 15, 20, 30].map((m) => m * 60),
  ...[1, 2, 5, 10, 20, 50, 100].map((d) => d * 3600),
];

/** Round multiples of the solar radius: 1-2-5 steps from 0.001 to 1000. */
const SOLAR_RADII_LADDER: number[] = [-3, -2, -1, 0, 1, 2].flatMap((e) => [1, 2, 5].map((m) => Number((m * 10 ** e).toPrecision(1))));

export interface NiceLength {
  /** The length in the ladder's unit. */
  value: number;
  /** The same length on screen. */
  lengthPx: number;
}

/**
 * The longest round length that fits in 40 % of the width; with steps of at most
 * 2.5 it is then at least 16 % of it. Outside the ladder's range the nearest end
 * is used.
 */
export function pickNiceLength(unitsPerScreenPx: number, viewerWidthPx: number, ladder: readonly number[]): NiceLength {
  if (!(unitsPerScreenPx > 0) || !(viewerWidthPx > 0)) throw new RangeError("unitsPerScreenPx and viewerWidthPx must be positive");
  const maxUnits = SCALE_BAR_MAX_FRACTION * viewerWidthPx * unitsPerScreenPx;
  let value = ladder[0];
  for (const candidate of ladder) if (candidate <= maxUnits) value = candidate;
  return { value, lengthPx: value / unitsPerScreenPx };
}

export function pickArcLength(arcsecPerScreenPx: number, viewerWidthPx: number): NiceLength {
  return pickNiceLength(arcsecPerScreenPx, viewerWidthPx, ARC_LADDER_ARCSEC);
}

export function pickSolarRadiiLength(solarRadiiPerScreenPx: number, viewerWidthPx: number): NiceLength {
  return pickNiceLength(solarRadiiPerScreenPx, viewerWidthPx, SOLAR_RADII_LADDER);
}

function trimNumber(v: number): string {
  return String(Number(v.toPrecision(6)));
}

/** An arc length as drawn on the bar: 30″, 5′, 2°. */
export function formatArc(arcsec: number): string {
  if (arcsec >= 3600) return `${trimNumber(arcsec / 3600)}°`;
  if (arcsec >= 60) return `${trimNumber(arcsec / 60)}′`;
  return `${trimNumber(arcsec)}″`;
}

/** The same length in words, for screen readers. */
export function formatArcWords(arcsec: number): string {
  const unit = (v: number, one: string) => `${trimNumber(v)} ${one}${v === 1 ? "" : "s"}`;
  if (arcsec >= 3600) return unit(arcsec / 3600, "degree");
  if (arcsec >= 60) return unit(arcsec / 60, "arcminute");
  return unit(arcsec, "arcsecond");
}

export function formatSolarRadii(radii: number): string {
  return `${trimNumber(radii)} R☉`;
}

export function formatSolarRadiiWords(radii: number): string {
  return `${trimNumber(radii)} solar ${radii === 1 ? "radius" : "radii"}`;
}

const DIRECTION_WORDS = ["up", "up and to the right", "right", "down and to the right", "down", "down and to the left", "left", "up and to the left"];

/** A screen direction (y down) in words, to the nearest eighth of a turn. */
export function describeScreenDirection(v: Vec2): string {
  // Clockwise angle from screen up.
  const deg = (Math.atan2(v.x, -v.y) * 180) / Math.PI;
  const sector = Math.round((((deg % 360) + 360) % 360) / 45) % 8;
  return DIRECTION_WORDS[sector];
}

export interface OverlayAvailability {
  available: boolean;
  /** Why the overlay is off, shown as the toggle's description. */
  reason?: string;
}

const positive = (v: number | undefined): v is number => typeof v === "number" && Number.isFinite(v) && v > 0;
const finitePoint = (p: Vec2 | undefined): p is Vec2 => !!p && Number.isFinite(p.x) && Number.isFinite(p.y);

/** Which overlays this plate's geometry can draw, and why not when it cannot. */
export function computeOverlayAvailability(g: ViewerGeometry): Record<OverlayKey, OverlayAvailability> {
  const hasSun = finitePoint(g.sunCentre) && positive(g.sunRadiusPx);
  const hasMoon = finitePoint(g.moonCentre) && positive(g.moonRadiusPx);
  const hasNorth = typeof g.solarNorthAngleDeg === "number" && Number.isFinite(g.solarNorthAngleDeg);
  const hasScale = positive(g.plateScaleArcsecPerPx);
  return {
    rings: hasSun ? { available: true } : { available: false, reason: "The Sun's centre and radius are not known for this image." },
    moon: hasMoon ? { available: true } : { available: false, reason: "The Moon's outline is not on record for this image." },
    north: hasNorth ? { available: true } : { available: false, reason: "The position angle of solar north is not known for this plate." },
    scale:
      hasScale || positive(g.sunRadiusPx)
        ? { available: true }
        : { available: false, reason: "Neither the plate scale nor the solar radius is known for this plate." },
  };
}

export interface RingShape {
  multiple: number;
  centre: Vec2;
  radiusPx: number;
  /** Where the ring's label sits: on the ring, up and to the right on screen. */
  label: Vec2;
}

export interface ScaleBarShape {
  lengthPx: number;
  label: string;
  words: string;
}

export interface OverlayScene {
  rings: RingShape[];
  moon: { centre: Vec2; radiusPx: number } | null;
  compass: { north: Vec2; east: Vec2 } | null;
  scaleBars: ScaleBarShape[];
}

/** Everything the switched-on overlays draw, in viewer-element pixels. */
export function buildOverlayScene(t: ImageToScreen, g: ViewerGeometry, on: ReadonlySet<OverlayKey>, viewerWidthPx: number): OverlayScene {
  const available = computeOverlayAvailability(g);
  const show = (key: OverlayKey) => on.has(key) && available[key].available;
  const scale = screenPxPerImagePx(t);
  const scene: OverlayScene = { rings: [], moon: null, compass: null, scaleBars: [] };
  if (show("rings") && g.sunCentre && g.sunRadiusPx) {
    const centre = projectPoint(t, g.sunCentre);
    scene.rings = computeRingRadiiPx(g.sunRadiusPx).map((r, i) => {
      const radiusPx = r * scale;
      return { multiple: RING_MULTIPLES[i], centre, radiusPx, label: { x: centre.x + radiusPx * Math.SQRT1_2, y: centre.y - radiusPx * Math.SQRT1_2 } };
    });
  }
  if (show("moon") && g.moonCentre && g.moonRadiusPx) {
    scene.moon = { centre: projectPoint(t, g.moonCentre), radiusPx: g.moonRadiusPx * scale };
  }
  if (show("north") && typeof g.solarNorthAngleDeg === "number") {
    const { north, east } = computeNorthEastVectors(g.solarNorthAngleDeg);
    scene.compass = { north: projectDirection(t, north), east: projectDirection(t, east) };
  }
  if (show("scale") && scale > 0 && viewerWidthPx > 0) {
    if (positive(g.plateScaleArcsecPerPx)) {
      const arc = pickArcLength(g.plateScaleArcsecPerPx / scale, viewerWidthPx);
      scene.scaleBars.push({ lengthPx: arc.lengthPx, label: formatArc(arc.value), words: formatArcWords(arc.value) });
    }
    if (positive(g.sunRadiusPx)) {
      const radii = pickSolarRadiiLength(1 / (g.sunRadiusPx * scale), viewerWidthPx);
      scene.scaleBars.push({ lengthPx: radii.lengthPx, label: formatSolarRadii(radii.value), words: formatSolarRadiiWords(radii.value) });
    }
  }
  return scene;
}

/** The switched-on overlays in words, for the viewer's text description. */
export function describeOverlayScene(scene: OverlayScene): string {
  const parts: string[] = [];
  if (scene.rings.length > 0) parts.push(`Rings mark 1, 2, 3 and 4 solar radii around the Sun's centre.`);
  if (scene.moon) parts.push("A dashed circle marks the Moon's outline.");
  if (scene.compass) parts.push(`Solar north points ${describeScreenDirection(scene.compass.north)} on screen, east points ${describeScreenDirection(scene.compass.east)}.`);
  if (scene.scaleBars.length > 0) parts.push(`Scale bar: ${scene.scaleBars.map((b) => b.words).join("; ")}.`);
  return parts.join(" ");
}
