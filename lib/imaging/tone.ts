// Renditions for display: natural (tone-mapped light) and structure (a radial
// filter scaled to 0..1), and quantizers for 16-bit PNG and 8-bit tiles.
import { ImagingError, requireNumberInRange } from "./errors";
import { applyStretch, NATURAL_PIXELS, RADIAL_BINS, RADIAL_GAIN, SCALE_BY_GAIN, type StretchCurve } from "./natural-kernels";
import { SERIAL_PLANE_RUNNER, type PlaneRunner } from "./plane-runner";
import { computeLuminance, ditherPlaneInto, encodeSrgb } from "./srgb";
import type { FilteredPlane } from "./radial";
import type { PlaneImage } from "./types";

export { applyShoulder, applyStretch, type StretchCurve } from "./natural-kernels";

/** A ring about a centre, px: the brightest inner corona just outside the lunar limb. */
export interface LimbRing {
  x: number;
  y: number;
  innerPx: number;
  outerPx: number;
}

export interface NaturalOptions {
  curve?: StretchCurve;
  /** Linear values mapped to display 0 and to the top of the curve; chosen from the valid pixels when absent. */
  blackPoint?: number;
  whitePoint?: number;
  /** Percentiles (0..100) for the automatic points; defaults 1 and 99.99 (common practice for the black point; see whitePoint). */
  blackPercentile?: number;
  whitePercentile?: number;
  /**
   * The ring from the lunar limb to about 1.1 solar radii. When given (and no
   * whitePoint), the white point is the ringPercentile-th percentile of the
   * valid luminance in it, so the inner corona up to the limb stays below white.
   */
  limbRing?: LimbRing;
  /** Percentile (0..100) of the ring's luminance taken as the white point; default 99.5. */
  ringPercentile?: number;
  /**
   * Start of the highlight shoulder in display light, (0, 1]; default 0.8. Above
   * it the curve rolls off exponentially towards 1 instead of clipping, so light
   * above the white point (prominences) keeps its gradations; 1 clips at white.
   */
  shoulderKnee?: number;
  /**
   * Radial compression alpha in [0, 1): before the stretch, light at radius r
   * from the ring's centre is multiplied by (P(r) / P(inner))^-alpha, P the
   * mean luminance over position angle, so the steep radial fall-off of the
   * corona takes less of the display range and its structure more. Needs
   * limbRing; default 0.3 with limbRing, else 0.
   */
  radialCompression?: number;
  /** Stretch strength beta; chosen so the median valid pixel lands at targetMedian when absent. */
  beta?: number;
  /** Display light (linear, before sRGB encoding) for the median valid pixel; default 0.03 (our choice: the outer field a dark grey). */
  targetMedian?: number;
  /** 1 = pixel counts for the percentiles (the lunar disk is usually left out). */
  valid?: Uint8Array;
  /** The image's luminance when the caller already has it. */
  luminance?: Float32Array;
  /**
   * Runs the per-pixel steps (on the calling thread when absent): the same
   * numbers with any runner. The rendition's planes are the runner's.
   */
  runner?: PlaneRunner;
}

export interface NaturalRendition {
  image: PlaneImage;
  blackPoint: number;
  whitePoint: number;
  beta: number;
  curve: StretchCurve;
}

/**
 * Percentiles (0..100) of the values, from a regular sub-sample of at most about
 * 250 000 values (a sample that size puts the 1st percentile within about 0.05
 * percentile points, ample for display points).
 */
export function computePercentiles(values: Float32Array, percentiles: number[], valid?: Uint8Array): number[] {
  // An odd stride avoids locking onto image columns.
  const step = Math.max(1, Math.floor(values.length / 250_000)) | 1;
  const picked = new Float32Array(Math.ceil(values.length / step));
  let count = 0;
  for (let i = 0; i < values.length; i += step) if ((!valid || valid[i]) && Number.isFinite(values[i])) picked[count++] = values[i];
  if (count === 0) return percentiles.map(() => NaN);
  const sorted = picked.subarray(0, count).sort();
  return percentiles.map((p) => sorted[Math.min(sorted.length - 1, Math.max(0, Math.round((p / 100) * (sorted.length - 1))))]);
}

function computeLuminanceOf(image: PlaneImage): Float32Array {
  if (image.planes.length === 1) return image.planes[0];
  const [r, g, b] = image.planes;
  const out = new Float32Array(r.length);
  for (let i = 0; i < out.length; i++) out[i] = computeLuminance(r[i], g[i], b[i]);
  return out;
}

/** Visits the pixel indices inside a ring (its bounding box only). */
function forEachInRing(width: number, height: number, ring: LimbRing, visit: (i: number) => void): void {
  const { x: cx, y: cy, innerPx, outerPx } = ring;
  const in2 = innerPx * innerPx, out2 = outerPx * outerPx;
  for (let y = Math.max(0, Math.floor(cy - outerPx)); y <= Math.min(height - 1, Math.ceil(cy + outerPx)); y++) {
    for (let x = Math.max(0, Math.floor(cx - outerPx)); x <= Math.min(width - 1, Math.ceil(cx + outerPx)); x++) {
      const d2 = (x - cx) ** 2 + (y - cy) ** 2;
      if (d2 >= in2 && d2 <= out2) visit(y * width + x);
    }
  }
}

function requireRing(ring: LimbRing): void {
  const ok = [ring.x, ring.y, ring.innerPx, ring.outerPx].every(Number.isFinite) && ring.innerPx >= 0 && ring.outerPx > ring.innerPx;
  if (!ok) throw new ImagingError("bad-parameter", `limbRing must have a finite centre and 0 <= innerPx < outerPx, got ${JSON.stringify(ring)}`);
}

/** The given percentile of the valid luminance inside the ring (NaN when the ring holds no valid pixel). */
function computeRingPercentile(lum: Float32Array, width: number, height: number, ring: LimbRing, percentile: number, valid?: Uint8Array): number {
  const mask = new Uint8Array(lum.length);
  forEachInRing(width, height, ring, (i) => {
    if (!valid || valid[i]) mask[i] = 1;
  });
  return computePercentiles(lum, [percentile], mask)[0];
}

/**
 * Share of the ring's pixels whose brightest display plane is at or above
 * `threshold` (0..1; 1 - 0.5 / 65535 is the top code of a 16-bit file): the
 * natural rendition's burnt-out share at the limb. The brightest plane, not
 * all three: a colour scaled down to keep its hue (renderNatural) has lost its
 * gradations just as a white pixel has. Pixels outside `valid` are left out (the Moon).
 */
export function measureWhiteFraction(image: PlaneImage, ring: LimbRing, threshold = 1 - 0.5 / 65535, valid?: Uint8Array): number {
  requireRing(ring);
  let count = 0, white = 0;
  forEachInRing(image.width, image.height, ring, (i) => {
    if (valid && !valid[i]) return;
    count++;
    if (image.planes.some((p) => p[i] >= threshold)) white++;
  });
  return count > 0 ? white / count : 0;
}

/**
 * Radial gain (P(r) / P(r0))^-alpha on the luminance about the ring's centre, r0
 * its inner radius: P is the mean valid luminance in rings 2 px wide, smoothed
 * over five rings and made non-increasing outwards (so a prominence or a
 * streamer does not dent the gain); 1 inside r0. The rings' sums are taken on
 * this thread in raster order (a float sum's rounding depends on its order);
 * each pixel's ring before them, and its gain after, by the runner.
 */
function computeRadialGain(lum: Float32Array, width: number, height: number, ring: LimbRing, alpha: number, valid: Uint8Array | undefined, runner: PlaneRunner): Float32Array {
  const { x: cx, y: cy, innerPx } = ring;
  const binPx = 2;
  const maxR = Math.hypot(Math.max(cx, width - cx), Math.max(cy, height - cy));
  const bins = Math.ceil(maxR / binPx) + 1;
  const n = width * height;
  // Each pixel's ring (-1 inside r0), in the gain's own buffer until the gain replaces it.
  const gain = runner.float32(n, true);
  runner.run(RADIAL_BINS, { bins: gain, width, cx, cy, innerPx, binPx }, height);
  const sum = new Float64Array(bins), count = new Float64Array(bins);
  for (let i = 0; i < n; i++) {
    if (valid && !valid[i]) continue;
    const b = gain[i];
    if (b < 0 || !(lum[i] > 0)) continue;
    sum[b] += lum[i];
    count[b]++;
  }
  const profile = new Float64Array(bins).fill(NaN);
  for (let b = 0; b < bins; b++) {
    let s = 0, c = 0;
    for (let k = Math.max(0, b - 2); k <= Math.min(bins - 1, b + 2); k++) { s += sum[k]; c += count[k]; }
    if (c > 0) profile[b] = s / c;
  }
  // Non-increasing outwards; empty rings take the last value.
  let last = NaN;
  for (let b = 0; b < bins; b++) {
    if (!Number.isFinite(profile[b])) profile[b] = last;
    else if (Number.isFinite(last) && profile[b] > last) profile[b] = last;
    last = profile[b];
  }
  const first = profile[Math.floor(innerPx / binPx)];
  if (!(first > 0)) return gain.fill(1);
  const binGain = runner.float64(bins, true);
  for (let b = 0; b < bins; b++) binGain[b] = profile[b] > 0 ? Math.pow(profile[b] / first, -alpha) : 1;
  runner.run(RADIAL_GAIN, { gain, binGain }, n);
  return gain;
}

/**
 * Natural rendition: x = (g I - black) / (white - black) in linear light, g the
 * optional radial gain; the stretch gives the luminance's display value (sRGB
 * encoded, IEC 61966-2-1), and every colour is scaled in linear light by the
 * same factor, so hues survive (Lupton et al. 2004, PASP 116:133). The
 * highlight shoulder then acts on the brightest plane and scales the others
 * with it: a bright colour is never clipped plane by plane (which turns
 * prominences white; Lupton et al. 2004 scale a saturated colour as a whole)
 * and keeps its gradations up to well above the white point. The curve sets
 * encoded values, not linear light: a log-like curve followed by the sRGB
 * encoding would compress the highlights twice. Returns display values in 0..1.
 *
 * With limbRing the white point sits at the top of the inner corona, not at a
 * percentile of the whole frame: the ring from the limb to 1.1 R is a fraction
 * of a per cent of a wide field, so any whole-frame percentile burns part of it.
 */
export function renderNatural(image: PlaneImage, options: NaturalOptions = {}): NaturalRendition {
  const curve = options.curve ?? "asinh";
  if (curve !== "asinh" && curve !== "log") throw new ImagingError("bad-parameter", `curve must be "asinh" or "log", got ${String(curve)}`);
  const knee = options.shoulderKnee ?? 0.8;
  requireNumberInRange("shoulderKnee", knee, 0.05, 1);
  const ring = options.limbRing;
  if (ring) requireRing(ring);
  const alpha = options.radialCompression ?? (ring ? 0.3 : 0);
  requireNumberInRange("radialCompression", alpha, 0, 0.95);
  if (alpha > 0 && !ring) throw new ImagingError("bad-parameter", "radialCompression needs limbRing (the centre to compress about)");
  const { width, height } = image;
  const runner = options.runner ?? SERIAL_PLANE_RUNNER;
  const n = width * height;
  const source = options.luminance ?? computeLuminanceOf(image);
  const gain = alpha > 0 ? computeRadialGain(source, width, height, ring!, alpha, options.valid, runner) : undefined;
  let lum = source;
  if (gain) {
    lum = runner.float32(n, true);
    runner.run(SCALE_BY_GAIN, { source, gain, lum }, n);
  }
  const [autoBlack, autoWhite, median] = computePercentiles(lum, [options.blackPercentile ?? 1, options.whitePercentile ?? 99.99, 50], options.valid);
  const black = options.blackPoint ?? autoBlack;
  let white = options.whitePoint;
  if (white === undefined && ring) {
    const ringPercentile = options.ringPercentile ?? 99.5;
    requireNumberInRange("ringPercentile", ringPercentile, 0, 100);
    const top = computeRingPercentile(lum, width, height, ring, ringPercentile, options.valid);
    if (Number.isFinite(top)) white = top;
  }
  white ??= autoWhite;
  if (!(Number.isFinite(black) && Number.isFinite(white) && white > black)) {
    throw new ImagingError("bad-parameter", `whitePoint (${white}) must exceed blackPoint (${black}); is the image empty or flat?`);
  }
  const span = white - black;
  let beta = options.beta;
  if (beta === undefined) {
    const target = encodeSrgb(options.targetMedian ?? 0.03);
    const xm = Math.min(1, Math.max(1e-9, (median - black) / span));
    // Bisection on ln beta: the stretched median grows with beta.
    let lo = 0, hi = Math.log(1e7);
    for (let k = 0; k < 60; k++) {
      const mid = (lo + hi) / 2;
      if (applyStretch(xm, Math.exp(mid), curve) < target) lo = mid;
      else hi = mid;
    }
    beta = Math.exp((lo + hi) / 2);
  }
  if (!(beta > 0 && Number.isFinite(beta))) throw new ImagingError("bad-parameter", `beta must be positive, got ${beta}`);
  // The linear planes are copied into the rendition's and turned into display values there.
  const planes = image.planes.map((p) => {
    const plane = runner.float32(n, true);
    plane.set(p);
    return plane;
  });
  runner.run(NATURAL_PIXELS, { planes, lum, gain, black, span, beta, curve, knee }, n);
  runner.release(gain, lum === source ? undefined : lum);
  return { image: { width, height, planes }, blackPoint: black, whitePoint: white, beta, curve };
}

/** Structure rendition: the filtered plane scaled to 0..1 between the given percentiles of valid values; invalid pixels 0. */
export function renderStructure(filtered: FilteredPlane, width: number, height: number, lowPercentile = 0.5, highPercentile = 99.5): PlaneImage {
  const [lo, hi] = computePercentiles(filtered.data, [lowPercentile, highPercentile], filtered.valid);
  const out = new Float32Array(width * height);
  if (Number.isFinite(lo) && hi > lo) {
    for (let i = 0; i < out.length; i++) {
      if (!filtered.valid[i]) continue;
      const v = (filtered.data[i] - lo) / (hi - lo);
      out[i] = v < 0 ? 0 : v > 1 ? 1 : v;
    }
  }
  return { width, height, planes: [out] };
}

/** Interleaved 16-bit samples (RGBRGB... or grey) from display values 0..1, for 16-bit PNG. */
export function quantizeToUint16(image: PlaneImage): Uint16Array {
  const channels = image.planes.length;
  const n = image.width * image.height;
  const out = new Uint16Array(n * channels);
  const code = (v: number) => Math.round(65535 * (v > 0 ? (v < 1 ? v : 1) : 0));
  if (channels === 3) {
    // Pixel by pixel: the three planes read and the samples written in order.
    const [r, g, b] = image.planes;
    for (let i = 0, o = 0; i < n; i++, o += 3) {
      out[o] = code(r[i]);
      out[o + 1] = code(g[i]);
      out[o + 2] = code(b[i]);
    }
    return out;
  }
  for (let c = 0; c < channels; c++) {
    const p = image.planes[c];
    for (let i = 0, o = c; i < n; i++, o += channels) out[o] = code(p[i]);
  }
  return out;
}

/**
 * Interleaved 8-bit samples from display values 0..1 with TPDF dither (see
 * ditherToUint8), seeded for repeatable tiles: one generator from `seed` runs
 * through the planes in turn, or, given one seed per plane, each plane has its own.
 */
export function quantizeToUint8(image: PlaneImage, seed: number | number[] = 1): Uint8Array {
  const channels = image.planes.length;
  const out = new Uint8Array(image.width * image.height * channels);
  if (Array.isArray(seed) && seed.length !== channels) throw new ImagingError("bad-parameter", `quantizeToUint8 needs one seed per plane (${channels}), got ${seed.length}`);
  let state = Array.isArray(seed) ? 0 : seed;
  for (let c = 0; c < channels; c++) state = ditherPlaneInto(image.planes[c], Array.isArray(seed) ? seed[c] : state, out, c, channels);
  return out;
}
