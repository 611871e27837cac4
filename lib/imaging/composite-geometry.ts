// Geometry of a composite: every input master carries a helioprojective WCS
// (HPLN-TAN / HPLT-TAN, CRVAL (0, 0) at the Sun's centre; lib/reduction-runner/
// helio-wcs.ts), and the composite's grid is one more such WCS, north up.
//
// All of them are gnomonic (TAN) projections with the same tangent point, the
// Sun's centre. Two such projections differ only by a rotation and a scale of
// the projection plane (WCS Paper II, Calabretta and Greisen 2002, section 5.1.3:
// the TAN plane is fixed by its tangent point), so the map from composite pixels
// to an input's pixels is an exact affine map: no spherical step is needed and
// none is approximated. Different observers each centre their helioprojective
// frame on the Sun; their views of the corona differ by parallax of order
// baseline / 1 au (under 1e-5 rad for 1000 km), far below a pixel.
//
// Pixel convention (helio-wcs.ts): 0-based centres, x right, y down; with alpha
// the position angle of solar north in the image (counter-clockwise from up),
//   HPLN = s (cos a dx - sin a dy),  HPLT = s (-sin a dx - cos a dy),
// dx, dy from the Sun's centre. That matrix is its own inverse.
import { ImagingError } from "./errors";

const DEG = Math.PI / 180;

/** One input's (or the composite's) pixel grid on the sky. */
export interface HelioGrid {
  width: number;
  height: number;
  /** Sun's centre, pixels (0-based centres). */
  sunX: number;
  sunY: number;
  scaleArcsecPerPx: number;
  /** Position angle of solar north in the image, degrees counter-clockwise from up. */
  solarNorthDeg: number;
}

/** Helioprojective (HPLN, HPLT) in arcsec of a pixel of a grid. */
export function pixelToHelio(g: HelioGrid, x: number, y: number): { lonArcsec: number; latArcsec: number } {
  const a = g.solarNorthDeg * DEG;
  const c = Math.cos(a), s = Math.sin(a);
  const dx = x - g.sunX, dy = y - g.sunY;
  return { lonArcsec: g.scaleArcsecPerPx * (c * dx - s * dy), latArcsec: g.scaleArcsecPerPx * (-s * dx - c * dy) };
}

/** The pixel of a grid at helioprojective (HPLN, HPLT) arcsec. */
export function helioToPixel(g: HelioGrid, lonArcsec: number, latArcsec: number): { x: number; y: number } {
  const a = g.solarNorthDeg * DEG;
  const c = Math.cos(a), s = Math.sin(a);
  const u = lonArcsec / g.scaleArcsecPerPx, v = latArcsec / g.scaleArcsecPerPx;
  return { x: g.sunX + c * u - s * v, y: g.sunY - s * u - c * v };
}

/** x_in = a x + b y + c, y_in = d x + e y + f: where a composite pixel falls in an input. */
export interface PixelMap {
  a: number; b: number; c: number;
  d: number; e: number; f: number;
}

/** The affine map from `from`'s pixels to `to`'s (exact for two TAN grids on one tangent point, see above). */
export function mapBetweenGrids(from: HelioGrid, to: HelioGrid): PixelMap {
  const o = pixelToHelio(from, 0, 0), ox = pixelToHelio(from, 1, 0), oy = pixelToHelio(from, 0, 1);
  const p0 = helioToPixel(to, o.lonArcsec, o.latArcsec);
  const px = helioToPixel(to, ox.lonArcsec, ox.latArcsec);
  const py = helioToPixel(to, oy.lonArcsec, oy.latArcsec);
  return { a: px.x - p0.x, b: py.x - p0.x, c: p0.x, d: px.y - p0.y, e: py.y - p0.y, f: p0.y };
}

export function applyPixelMap(m: PixelMap, x: number, y: number): { x: number; y: number } {
  return { x: m.a * x + m.b * y + m.c, y: m.d * x + m.e * y + m.f };
}

/** Largest side of a composite's grid, px, and its most pixels: beyond them the composite asks for a coarser scale. */
export const MAX_COMPOSITE_SIDE_PX = 16_384;
export const MAX_COMPOSITE_PIXELS = 160_000_000;

/**
 * The composite's grid: north up, at the finest input's plate scale (or the one
 * asked for), wide enough for every input's whole field, with the Sun's centre
 * on a pixel centre in the middle. Throws when the canvas would pass the limits
 * above; the message says which scale would fit.
 */
export function chooseCompositeGrid(inputs: HelioGrid[], scaleArcsecPerPx?: number): HelioGrid {
  if (inputs.length === 0) throw new ImagingError("too-few-frames", "a composite needs at least one input");
  const finest = Math.min(...inputs.map((g) => g.scaleArcsecPerPx));
  const scale = scaleArcsecPerPx ?? finest;
  if (!(scale > 0) || !Number.isFinite(scale)) throw new ImagingError("bad-parameter", `the composite's plate scale must be a positive number of arcsec per pixel, not ${scale}`);
  let halfLon = 0, halfLat = 0;
  for (const g of inputs) {
    for (const [x, y] of [[-0.5, -0.5], [g.width - 0.5, -0.5], [-0.5, g.height - 0.5], [g.width - 0.5, g.height - 0.5]]) {
      const w = pixelToHelio(g, x, y);
      halfLon = Math.max(halfLon, Math.abs(w.lonArcsec));
      halfLat = Math.max(halfLat, Math.abs(w.latArcsec));
    }
  }
  const halfW = Math.ceil(halfLon / scale), halfH = Math.ceil(halfLat / scale);
  const width = 2 * halfW + 1, height = 2 * halfH + 1;
  if (width > MAX_COMPOSITE_SIDE_PX || height > MAX_COMPOSITE_SIDE_PX || width * height > MAX_COMPOSITE_PIXELS) {
    const fit = Math.max((2 * halfLon) / MAX_COMPOSITE_SIDE_PX, (2 * halfLat) / MAX_COMPOSITE_SIDE_PX, Math.sqrt((4 * halfLon * halfLat) / MAX_COMPOSITE_PIXELS));
    throw new ImagingError("too-large", `the composite would be ${width} x ${height} px at ${scale.toFixed(3)} arcsec/px, beyond ${MAX_COMPOSITE_SIDE_PX} px a side or ${MAX_COMPOSITE_PIXELS / 1e6} megapixels; choose a plate scale of at least ${(fit * 1.001).toFixed(3)} arcsec/px`);
  }
  return { width, height, sunX: halfW, sunY: halfH, scaleArcsecPerPx: scale, solarNorthDeg: 0 };
}
