// What ingest measures on a decoded frame for triage: a luminance histogram,
// a sharpness figure, and the lunar limb. Pure typed-array work on a shrunken
// luminance (a 24 Mpx frame never gets a full-size copy here); the worker does
// the I/O.
import { downsampleMeanOf } from "@/lib/imaging/coarse-disk";
import { fitLimb } from "@/lib/imaging/limb-fit";
import type { PlaneImage } from "@/lib/imaging/types";
import type { FrameFlags } from "@/db/schema";
import { measureReach } from "./frame-reach";

export const HISTOGRAM_BINS = 64;
/** Long side of the luminance the sharpness is measured on, so the figure compares frames of any size. */
export const SHARPNESS_SIDE_PX = 256;
/** Long side of the luminance the limb is fitted on: enough for a sub-pixel edge, quick at ingest. */
export const LIMB_SIDE_PX = 512;
/** A frame is blurred when its sharpness is below this share of the median of its set's light frames. */
export const BLURRED_FRACTION_OF_MEDIAN = 0.5;
/** isBlurred needs a median worth comparing with: at least this many light frames with a sharpness. */
const MIN_FRAMES_FOR_BLUR = 3;

// Rec. 709 / sRGB luminance weights (REFERENCES.md, sRGB: Y = 0.2126 R + 0.7152 G + 0.0722 B).
const LUMA = [0.2126, 0.7152, 0.0722] as const;

function lumaAt(planes: Float32Array[], i: number): number {
  return planes.length >= 3 ? LUMA[0] * planes[0][i] + LUMA[1] * planes[1][i] + LUMA[2] * planes[2][i] : planes[0][i];
}

export interface Luminance {
  data: Float32Array;
  width: number;
  height: number;
  /** Original pixels per luminance pixel along each axis. */
  factor: number;
}

/**
 * Box-mean luminance shrunk by the smallest whole factor that brings the long
 * side to at most `maxSidePx` (cells at the right and bottom edges average what
 * they hold). Values stay in the planes' units.
 */
export function shrinkLuminance(image: PlaneImage, maxSidePx: number): Luminance {
  const { width, height, planes } = image;
  const factor = Math.max(1, Math.ceil(Math.max(width, height) / maxSidePx));
  const { data, width: w, height: h } = downsampleMeanOf(width, height, factor, (i) => lumaAt(planes, i));
  return { data, width: w, height: h, factor };
}

/**
 * 64 pixel counts of the full-resolution luminance in bins of equal width from
 * 0 to the white level (values below 0 count in the first bin, values at or
 * above the white level in the last). Without a finite white level (float
 * FITS) the brightest luminance sets the range. The counts add up to the pixel count.
 */
export function measureHistogram(image: PlaneImage, whiteLevel: number): number[] {
  const n = image.width * image.height;
  const bins = new Array<number>(HISTOGRAM_BINS).fill(0);
  let top = whiteLevel;
  if (!Number.isFinite(top) || top <= 0) {
    top = 0;
    for (let i = 0; i < n; i++) top = Math.max(top, lumaAt(image.planes, i));
  }
  if (!(top > 0)) {
    bins[0] = n;
    return bins;
  }
  const scale = HISTOGRAM_BINS / top;
  for (let i = 0; i < n; i++) {
    const b = Math.floor(lumaAt(image.planes, i) * scale);
    // NaN (a float FITS blank) counts in the first bin, so the total stays the pixel count.
    bins[b >= HISTOGRAM_BINS ? HISTOGRAM_BINS - 1 : b > 0 ? b : 0]++;
  }
  return bins;
}

/**
 * Sharpness: the variance of the 4-neighbour Laplacian of the luminance shrunk
 * to about 256 px on the long side, divided by the variance of that luminance.
 * Dividing makes the figure independent of exposure, gain and black level
 * (L(a Y + b) = a L(Y), so both variances scale by a^2), so the frames of one
 * bracket compare; a blur removes high frequencies and lowers it. Fixed-size
 * shrinking makes it independent of the sensor's pixel count. 0 for a flat frame.
 */
export function measureSharpness(image: PlaneImage): number {
  return measureSharpnessOf(shrinkLuminance(image, SHARPNESS_SIDE_PX));
}

export function measureSharpnessOf(lum: Luminance): number {
  const { data, width: w, height: h } = lum;
  if (w < 3 || h < 3) return 0;
  let mean = 0;
  let finite = 0;
  for (const v of data) if (Number.isFinite(v)) { mean += v; finite++; }
  if (finite === 0) return 0;
  mean /= finite;
  let imageVar = 0;
  for (const v of data) if (Number.isFinite(v)) imageVar += (v - mean) ** 2;
  imageVar /= finite;
  if (!(imageVar > 0)) return 0;
  let s = 0;
  let s2 = 0;
  let m = 0;
  for (let y = 1; y < h - 1; y++) {
    for (let x = 1; x < w - 1; x++) {
      const i = y * w + x;
      const lap = data[i - 1] + data[i + 1] + data[i - w] + data[i + w] - 4 * data[i];
      if (!Number.isFinite(lap)) continue;
      s += lap;
      s2 += lap * lap;
      m++;
    }
  }
  if (m === 0) return 0;
  const lapMean = s / m;
  return Math.max(0, s2 / m - lapMean * lapMean) / imageVar;
}

/** The clip level as a share of the white level: the imaging core's (DESIGN.md section 3, "about 0.92 of the white level"). */
const CLIP_FRACTION = 0.92;

/** IEC 61966-2-1 decoding of an 8-bit code to linear light in 0..1 (REFERENCES.md, sRGB). */
export function decodeSrgb(code: number): number {
  const v = code / 255;
  return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
}

type LimbFlag = NonNullable<FrameFlags["limb"]>;

/**
 * The lunar limb, fitted with the imaging core's robust limb fit on a linear
 * luminance shrunk to about 512 px on the long side, then scaled back to the
 * original's pixels. A shrunken pixel j covers original pixels j*f .. j*f+f-1,
 * so its centre is at j*f + (f-1)/2. Quality is the fit's own verdict (sound
 * is "good"). When the fit failed, the numbers are whatever it reached (0 when
 * it found no circle) and mean nothing.
 */
export interface FrameEncoding {
  encoding: "linear" | "srgb8";
  blackLevel: number;
  whiteLevel: number;
}

/** Linear light of the shrunken luminance (black level off, sRGB decoded), with the clip level in the same units when the frame has one. */
export interface LinearLuminance extends Luminance {
  clipLevel: number | undefined;
}

/** The luminance shrunk to about 512 px on the long side, in linear light: what the limb fit and the reach measure read. */
export function shrinkLinearLuminance(image: PlaneImage, frame: FrameEncoding): LinearLuminance {
  const lum = shrinkLuminance(image, LIMB_SIDE_PX);
  const linear = new Float32Array(lum.data.length);
  for (let i = 0; i < linear.length; i++) {
    const v = lum.data[i];
    linear[i] = frame.encoding === "srgb8" ? decodeSrgb(v) : Number.isFinite(v) ? Math.max(0, v - frame.blackLevel) : 0;
  }
  const white = frame.encoding === "srgb8" ? 1 : frame.whiteLevel - frame.blackLevel;
  return { data: linear, width: lum.width, height: lum.height, factor: lum.factor, clipLevel: Number.isFinite(white) && white > 0 ? CLIP_FRACTION * white : undefined };
}

export function measureLimb(image: PlaneImage, frame: FrameEncoding): LimbFlag {
  return measureLimbOf(shrinkLinearLuminance(image, frame));
}

function measureLimbOf(lum: LinearLuminance): LimbFlag {
  // Clipped light biases the edge inward; the fit leaves such rays out when it may.
  const fit = fitLimb(lum.data, lum.width, lum.height, { clipLevel: lum.clipLevel });
  const f = lum.factor;
  const finite = (v: number) => (Number.isFinite(v) ? v : 0);
  return {
    cx: finite(fit.x * f + (f - 1) / 2),
    cy: finite(fit.y * f + (f - 1) / 2),
    radiusPx: finite(fit.radiusPx * f),
    rmsPx: finite(fit.rmsPx * f),
    quality: fit.verdict === "sound" ? "good" : fit.verdict,
  };
}

/** Everything ingest records about the frame's pixels beside the clipped fraction. */
export function analyseFrame(image: PlaneImage, frame: FrameEncoding): Pick<FrameFlags, "histogram" | "sharpness" | "limb" | "reach"> {
  const lum = shrinkLinearLuminance(image, frame);
  const limb = measureLimbOf(lum);
  const reach = limb.quality === "failed" ? undefined : measureReach(lum, limb, frame.encoding);
  return {
    histogram: measureHistogram(image, frame.whiteLevel),
    sharpness: measureSharpness(image),
    limb,
    ...(reach ? { reach } : {}),
  };
}

/** Frames within this factor of a frame's exposure (two stops either way) are its peers for sharpness. */
export const SHARPNESS_PEER_EXPOSURE_FACTOR = 4;

function medianOf(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/**
 * Which frames are blurred, relative to their set: a light frame whose
 * sharpness is below half the median sharpness of its peers. With exposures
 * known, the peers are the light frames within two stops of its exposure (itself
 * included): a long exposure, smooth by its purpose (the outer corona, the inner
 * one clipped flat), is compared with long exposures, not with the shortest
 * ones. Without an exposure the peers are all the set's light frames. Frames
 * without a sharpness, calibration frames, and frames with fewer than three
 * measured peers are never marked.
 */
export function markBlurred(items: { sharpness?: number; isLight: boolean; exposureS?: number | null }[]): boolean[] {
  const measured = items.filter((f) => f.isLight && typeof f.sharpness === "number" && Number.isFinite(f.sharpness));
  return items.map((f) => {
    if (!f.isLight || typeof f.sharpness !== "number" || !Number.isFinite(f.sharpness)) return false;
    const own = f.exposureS;
    const peers = measured.filter((p) => !(own && own > 0) || (p.exposureS && p.exposureS > 0 && p.exposureS <= own * SHARPNESS_PEER_EXPOSURE_FACTOR && p.exposureS >= own / SHARPNESS_PEER_EXPOSURE_FACTOR));
    if (peers.length < MIN_FRAMES_FOR_BLUR) return false;
    return f.sharpness < BLURRED_FRACTION_OF_MEDIAN * medianOf(peers.map((p) => p.sharpness as number));
  });
}
