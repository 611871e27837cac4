// Frame linearization and masks: black level, white level, 8-bit decode, the
// clipped mask and the noise-floor mask.
import { dilateMask } from "./blur";
import { averageBoxes } from "./coarse-disk";
import { ImagingError } from "./errors";
import { findKthSmallest } from "./select";
import { computeLuminancePlane, createSrgbDecodeTable } from "./srgb";
import { readPlaneLengths, type LinearFrame } from "./types";

export interface LinearizedFrame {
  name: string;
  width: number;
  height: number;
  exposureS: number;
  encoding: LinearFrame["encoding"];
  /** Linear planes: DN above black for linear input; relative light (0..1 at code 255) for 8-bit input. */
  planes: Float32Array[];
  /** Luminance of the linear planes (IEC 61966-2-1 weights; the plane itself for grey). */
  luminance: Float32Array;
  /** Value at and above which a plane counts as clipped, in the planes' units. */
  clipLevel: number;
  /** 1 where any plane is clipped, dilated by one pixel (3 x 3) because the PSF and demosaicing spread saturation. */
  clipped: Uint8Array;
  /** 1 where the luminance lies in the noise floor. */
  noiseFloor: Uint8Array;
  /** Sensor defects (hot, stuck, dead) of the frame, 1 = masked; absent when none are known. */
  masked?: Uint8Array;
  /** Estimated dark noise, planes' units. */
  noiseSigma: number;
  /** The value below which a pixel is in the noise floor, planes' units. */
  noiseFloorLevel: number;
  captureTimeMs?: number;
}

/** 8-bit codes at or below this are in the noise floor (common practice: a few codes of read noise and JPEG error). */
export const NOISE_FLOOR_CODE = 4;
/** Linear data: a pixel is in the noise floor below this many dark-noise sigmas (common practice: a 3-sigma detection). */
export const NOISE_FLOOR_SIGMAS = 3;

/**
 * Checks one frame's shape and numbers; throws an ImagingError naming the frame
 * and field. Returns the planes it checked, for the caller to use: a frame kept
 * on disk (lib/reduction-runner/frame-spill.ts) reads them back at every look.
 */
export function validateFrame(frame: LinearFrame): Float32Array[] {
  // One look at the planes: a frame kept on disk gives a fresh copy at each.
  const planes = frame.image.planes;
  checkFrameShape(frame, planes);
  return planes;
}

/**
 * validateFrame without the planes: the checks read their lengths only (from
 * `planes` when the caller holds them), so a frame whose planes wait on disk is
 * not read. Returns the number of planes.
 */
export function checkFrameShape(frame: LinearFrame, planes?: readonly Float32Array[]): number {
  const name = frame?.name ?? "(unnamed frame)";
  if (!(typeof frame.exposureS === "number" && Number.isFinite(frame.exposureS) && frame.exposureS > 0)) {
    throw new ImagingError("bad-exposure", `exposureS must be a positive finite number of seconds, got ${String(frame.exposureS)}`, name);
  }
  const { width, height } = frame.image;
  if (!(Number.isInteger(width) && Number.isInteger(height) && width > 0 && height > 0)) {
    throw new ImagingError("size-mismatch", `image size must be positive integers, got ${width} x ${height}`, name);
  }
  const lengths = planes ? planes.map((p) => p.length) : readPlaneLengths(frame.image);
  if (lengths.length !== 1 && lengths.length !== 3) throw new ImagingError("size-mismatch", `image must have 1 or 3 planes, got ${lengths.length}`, name);
  lengths.forEach((length, i) => {
    if (length !== width * height) throw new ImagingError("size-mismatch", `plane ${i} has ${length} values, expected ${width} x ${height}`, name);
  });
  if (frame.encoding === "linear") {
    if (!(Number.isFinite(frame.blackLevel) && Number.isFinite(frame.whiteLevel) && frame.whiteLevel > frame.blackLevel && frame.blackLevel >= 0)) {
      throw new ImagingError("bad-levels", `whiteLevel (${frame.whiteLevel}) must exceed blackLevel (${frame.blackLevel}) >= 0`, name);
    }
  } else if (frame.encoding !== "srgb8") {
    throw new ImagingError("bad-parameter", `encoding must be "linear" or "srgb8", got ${String(frame.encoding)}`, name);
  }
  return lengths.length;
}

/**
 * Immerkaer (1996), "Fast noise variance estimation", CVIU 64:300: the Laplacian
 * difference kernel N = [1 -2 1; -2 4 -2; 1 -2 1] cancels smooth structure and has
 * sum N^2 = 36, so for Gaussian noise median |I * N| = 0.6745 x 6 sigma. We take
 * the median over the darkest quarter of the image,
 * which estimates the read noise rather than the photon noise of the bright corona.
 */
export function estimateDarkNoiseSigma(plane: Float32Array, width: number, height: number): number {
  if (width < 3 || height < 3) return 0;
  // Dark regions are chosen by 8 x 8 block means, not by each pixel's own value,
  // which would pick pixels with negative noise and bias the estimate upward.
  const block = 8;
  const bw = Math.ceil(width / block);
  const means = averageBoxes(plane, width, height, block, new Float64Array(bw * Math.ceil(height / block)));
  const darkLimit = findKthSmallest(Float64Array.from(means), Math.floor(means.length * 0.25)) as number;
  // Every pixel of a small frame; a regular sub-sample of about 250 000 from a large one.
  const step = Math.max(1, Math.round(Math.sqrt((width * height) / 250_000)));
  const responses = new Float32Array(Math.ceil(height / step) * Math.ceil(width / step));
  let count = 0;
  for (let y = 1; y < height - 1; y += step) {
    const meansRow = (y >> 3) * bw;
    for (let x = 1; x < width - 1; x += step) {
      if (means[meansRow + (x >> 3)] > darkLimit) continue;
      const i = y * width + x;
      const v =
        plane[i - width - 1] - 2 * plane[i - width] + plane[i - width + 1] -
        2 * plane[i - 1] + 4 * plane[i] - 2 * plane[i + 1] +
        plane[i + width - 1] - 2 * plane[i + width] + plane[i + width + 1];
      responses[count++] = Math.abs(v);
    }
  }
  if (count === 0) return 0;
  return (findKthSmallest(responses.subarray(0, count), count >> 1) as number) / (6 * 0.6745);
}

export interface LinearizeOptions {
  /** 8-bit input: 256 linear values per code (e.g. from recoverResponse); the sRGB curve when absent. */
  responseTable?: ArrayLike<number>;
  /**
   * Keep the black-subtracted planes of linear input (default true). The
   * pipeline drops them: it warps the original planes and subtracts the black
   * level afterwards, which keeps one copy of a large bracket in memory.
   */
  keepPlanes?: boolean;
}

/** The linear planes (when kept), luminance, clip level and clipped mask of a frame's source planes. */
function convertPlanes(frame: LinearFrame, clipFraction: number, options: LinearizeOptions): { planes: Float32Array[]; luminance: Float32Array; clipLevel: number; clipped: Uint8Array } {
  const sources = validateFrame(frame);
  if (!(clipFraction > 0 && clipFraction <= 1)) throw new ImagingError("bad-parameter", `clipFraction must be in (0, 1], got ${clipFraction}`);
  const { width, height } = frame.image;
  const n = width * height;
  const clipped = new Uint8Array(n);
  let planes: Float32Array[];
  let clipLevel: number;
  let luminance: Float32Array;
  if (frame.encoding === "linear") {
    const black = frame.blackLevel;
    const level = clipFraction * (frame.whiteLevel - black);
    clipLevel = level;
    luminance = new Float32Array(n);
    if (sources.length === 3) {
      const [r, g, b] = sources;
      for (let i = 0; i < n; i++) {
        const rv = r[i] - black, gv = g[i] - black, bv = b[i] - black;
        luminance[i] = 0.2126 * rv + 0.7152 * gv + 0.0722 * bv;
        if (rv >= level || gv >= level || bv >= level) clipped[i] = 1;
      }
    } else {
      const src = sources[0];
      for (let i = 0; i < n; i++) {
        const v = src[i] - black;
        luminance[i] = v;
        if (v >= level) clipped[i] = 1;
      }
    }
    planes = options.keepPlanes === false ? [] : sources.map((src) => {
      const out = new Float32Array(n);
      for (let i = 0; i < n; i++) out[i] = src[i] - black;
      return out;
    });
  } else {
    const table = options.responseTable ?? createSrgbDecodeTable();
    if (table.length !== 256) throw new ImagingError("bad-parameter", `response table must have 256 entries, got ${table.length}`, frame.name);
    const clipCode = clipFraction * 255;
    planes = sources.map((src, p) => {
      const out = new Float32Array(n);
      for (let i = 0; i < n; i++) {
        const code = src[i];
        if (!(code >= 0 && code <= 255)) throw new ImagingError("bad-parameter", `plane ${p} holds ${code} at pixel ${i}; 8-bit codes must be 0..255`, frame.name);
        out[i] = table[Math.round(code)];
        if (code >= clipCode) clipped[i] = 1;
      }
      return out;
    });
    clipLevel = table[Math.min(255, Math.ceil(clipCode))];
    luminance = computeLuminancePlane(planes);
  }
  return { planes, luminance, clipLevel, clipped };
}

/**
 * Linearizes one frame. Linear input: v = DN - black, clip level clipFraction x
 * (white - black). 8-bit input: v = decode(code) with the IEC 61966-2-1 sRGB
 * curve, or with the given response table, clip level at code clipFraction x
 * 255. A pixel is clipped when any plane is. Also returns the luminance
 * (IEC 61966-2-1 weights), whose dark noise sets the noise floor.
 */
export function linearizeFrame(frame: LinearFrame, clipFraction: number, options: LinearizeOptions = {}): LinearizedFrame {
  // The source planes are read in a function of their own: a frame kept on disk lets them go
  // as soon as its luminance and clipped mask are made (288 MB at 24 megapixels, in colour).
  const { planes, luminance, clipLevel, clipped } = convertPlanes(frame, clipFraction, options);
  const { width, height } = frame.image;
  const n = width * height;
  if (frame.saturated) for (let i = 0; i < n; i++) if (frame.saturated[i]) clipped[i] = 1;
  // Defects never reach the limb fit or registration as light: their luminance is the median of their
  // sound neighbours, written in place (the luminance is this function's own; see writeRepairs).
  if (frame.badPixels) writeRepairs(luminance, frame.badPixels, width, height, luminance);
  const noiseSigma = frame.encoding === "linear" ? estimateDarkNoiseSigma(luminance, width, height) : (options.responseTable ?? createSrgbDecodeTable())[1];
  const noiseFloorLevel = frame.encoding === "linear" ? NOISE_FLOOR_SIGMAS * noiseSigma : (options.responseTable ?? createSrgbDecodeTable())[NOISE_FLOOR_CODE];
  const noiseFloor = new Uint8Array(n);
  for (let i = 0; i < n; i++) if (luminance[i] <= noiseFloorLevel) noiseFloor[i] = 1;
  return {
    name: frame.name,
    width,
    height,
    exposureS: frame.exposureS,
    encoding: frame.encoding,
    planes,
    luminance,
    clipLevel,
    clipped: dilateMask(clipped, width, height, 1),
    noiseFloor,
    masked: frame.badPixels,
    noiseSigma,
    noiseFloorLevel,
    captureTimeMs: frame.captureTimeMs,
  };
}

/** A copy of the plane with each masked pixel replaced by the median of the unmasked ones among its 8 neighbours. */
export function repairDefects(plane: Float32Array, masked: Uint8Array, width: number, height: number): Float32Array {
  const out = Float32Array.from(plane);
  writeRepairs(plane, masked, width, height, out);
  return out;
}

/**
 * repairDefects done in the plane itself, for a moment: the defects' values are
 * saved and replaced, and the returned function puts them back. A warp reads the
 * repaired plane without a second full plane (96 MB at 24 megapixels, per colour)
 * being made for it; the plane is the caller's again once restored.
 */
export function patchDefects(plane: Float32Array, masked: Uint8Array, width: number, height: number): () => void {
  const saved: { index: number[]; value: number[] } = { index: [], value: [] };
  writeRepairs(plane, masked, width, height, plane, saved);
  return () => {
    for (let k = 0; k < saved.index.length; k++) plane[saved.index[k]] = saved.value[k];
  };
}

/**
 * Each defect's value in `out` (which may be `plane`): the median of its sound
 * neighbours, read from `plane`. Sound pixels are never written, so repairing in
 * place reads the same neighbours as repairing into a copy.
 */
function writeRepairs(plane: Float32Array, masked: Uint8Array, width: number, height: number, out: Float32Array, saved?: { index: number[]; value: number[] }): void {
  if (masked.length !== plane.length) throw new ImagingError("size-mismatch", `defect map has ${masked.length} pixels, the frame ${plane.length}`);
  const around: number[] = [];
  // Defects are few: the walk skips four sound pixels at a time (a zero word), in row-major order as before.
  const words = masked.byteOffset % 4 === 0 ? new Uint32Array(masked.buffer, masked.byteOffset, masked.length >> 2) : new Uint32Array(0);
  for (let j = 0; j < words.length; j++) {
    if (words[j] === 0) continue;
    for (let i = 4 * j; i < 4 * j + 4; i++) if (masked[i]) repairDefect(plane, masked, width, height, out, i, around, saved);
  }
  for (let i = 4 * words.length; i < masked.length; i++) if (masked[i]) repairDefect(plane, masked, width, height, out, i, around, saved);
}

/** writeRepairs at defect i: the median of its sound neighbours (`around` is scratch), when it has any. */
function repairDefect(plane: Float32Array, masked: Uint8Array, width: number, height: number, out: Float32Array, i: number, around: number[], saved?: { index: number[]; value: number[] }): void {
  const y = (i / width) | 0;
  const x = i - y * width;
  around.length = 0;
  for (let v = Math.max(0, y - 1); v <= Math.min(height - 1, y + 1); v++) {
    for (let u = Math.max(0, x - 1); u <= Math.min(width - 1, x + 1); u++) if (!masked[v * width + u]) around.push(plane[v * width + u]);
  }
  if (around.length === 0) return;
  around.sort((a, b) => a - b);
  if (saved) {
    saved.index.push(i);
    saved.value.push(plane[i]);
  }
  out[i] = around[around.length >> 1];
}
