// Renditions for display: natural (tone-mapped light) and structure (a radial
// filter scaled to 0..1), and quantizers for 16-bit PNG and 8-bit tiles.
import { ImagingError } from "./errors";
import { createRng } from "./random";
import { computeLuminance, createSrgbEncoder, ditherToUint8 } from "./srgb";
import type { FilteredPlane } from "./radial";
import type { PlaneImage } from "./types";

export type StretchCurve = "asinh" | "log";

export interface NaturalOptions {
  curve?: StretchCurve;
  /** Linear values mapped to display 0 and 1; chosen from percentiles of valid pixels when absent. */
  blackPoint?: number;
  whitePoint?: number;
  /** Percentiles (0..100) for the automatic points; defaults 1 and 99.9 (common practice). */
  blackPercentile?: number;
  whitePercentile?: number;
  /** Stretch strength beta; chosen so the median valid pixel lands at targetMedian when absent. */
  beta?: number;
  /** Display light (linear, before sRGB encoding) for the median valid pixel; default 0.05 (common practice). */
  targetMedian?: number;
  /** 1 = pixel counts for the percentiles (the lunar disk is usually left out). */
  valid?: Uint8Array;
  /** The image's luminance when the caller already has it. */
  luminance?: Float32Array;
}

export interface NaturalRendition {
  image: PlaneImage;
  blackPoint: number;
  whitePoint: number;
  beta: number;
  curve: StretchCurve;
}

/**
 * Stretch curves on x in [0, 1]: asinh after Lupton et al. (1999), AJ 118:1406,
 * y = asinh(beta x) / asinh(beta); log, y = ln(1 + beta x) / ln(1 + beta).
 */
export function applyStretch(x: number, beta: number, curve: StretchCurve): number {
  if (x <= 0) return 0;
  return curve === "asinh" ? Math.asinh(beta * x) / Math.asinh(beta) : Math.log1p(beta * x) / Math.log1p(beta);
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

/**
 * Natural rendition: x = (I - black) / (white - black) in linear light, the
 * stretch applied to the luminance and every colour scaled by the same factor
 * (so hues survive; Lupton et al. 2004, PASP 116:133), then sRGB encoding
 * (IEC 61966-2-1). Returns display values in 0..1.
 */
export function renderNatural(image: PlaneImage, options: NaturalOptions = {}): NaturalRendition {
  const curve = options.curve ?? "asinh";
  if (curve !== "asinh" && curve !== "log") throw new ImagingError("bad-parameter", `curve must be "asinh" or "log", got ${String(curve)}`);
  const lum = options.luminance ?? computeLuminanceOf(image);
  const [autoBlack, autoWhite, median] = computePercentiles(lum, [options.blackPercentile ?? 1, options.whitePercentile ?? 99.9, 50], options.valid);
  const black = options.blackPoint ?? autoBlack;
  const white = options.whitePoint ?? autoWhite;
  if (!(Number.isFinite(black) && Number.isFinite(white) && white > black)) {
    throw new ImagingError("bad-parameter", `whitePoint (${white}) must exceed blackPoint (${black}); is the image empty or flat?`);
  }
  const span = white - black;
  let beta = options.beta;
  if (beta === undefined) {
    const target = options.targetMedian ?? 0.05;
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
  const n = image.width * image.height;
  const planes = image.planes.map(() => new Float32Array(n));
  const encode = createSrgbEncoder();
  for (let i = 0; i < n; i++) {
    const x = (lum[i] - black) / span;
    const factor = x > 0 ? applyStretch(Math.min(x, 1e6), beta, curve) / x : 0;
    for (let c = 0; c < planes.length; c++) planes[c][i] = encode(((image.planes[c][i] - black) / span) * factor);
  }
  return { image: { width: image.width, height: image.height, planes }, blackPoint: black, whitePoint: white, beta, curve };
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
  for (let c = 0; c < channels; c++) {
    const p = image.planes[c];
    for (let i = 0; i < n; i++) {
      const v = p[i];
      out[i * channels + c] = Math.round(65535 * (v > 0 ? (v < 1 ? v : 1) : 0));
    }
  }
  return out;
}

/** Interleaved 8-bit samples from display values 0..1 with TPDF dither (see ditherToUint8), seeded for repeatable tiles. */
export function quantizeToUint8(image: PlaneImage, seed = 1): Uint8Array {
  const channels = image.planes.length;
  const n = image.width * image.height;
  const out = new Uint8Array(n * channels);
  const rng = createRng(seed);
  for (let c = 0; c < channels; c++) {
    const q = ditherToUint8(image.planes[c], rng);
    for (let i = 0; i < n; i++) out[i * channels + c] = q[i];
  }
  return out;
}
