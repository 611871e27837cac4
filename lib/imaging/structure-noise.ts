// Inputs that keep the structure rendition honest about noise and coverage:
// a per-pixel noise variance (from the merge or estimated from the image) and
// the mask of pixels the rendition may show.
import { blurGaussianFast } from "./blur";
import { ImagingError, requireNumberInRange } from "./errors";
import { definePlaneKernel, SERIAL_PLANE_RUNNER, type PlaneRunner } from "./plane-runner";
import type { LunarDisk } from "./radial";

/** Rec. 709 / sRGB luminance weights (IEC 61966-2-1), as computeLuminance uses them. */
const LUMINANCE_WEIGHTS = [0.2126, 0.7152, 0.0722];

/**
 * Variance of the luminance Y = sum k_c C_c from the variance of each colour
 * plane, var Y = sum k_c^2 var C_c (planes with independent noise, as the
 * merge's are: each plane is its own set of photosites). One plane is returned as is.
 */
export function combineLuminanceVariance(variance: Float32Array[]): Float32Array {
  if (variance.length === 1) return variance[0];
  if (variance.length !== 3) throw new ImagingError("bad-parameter", `variance must have 1 or 3 planes, got ${variance.length}`);
  const n = variance[0].length;
  if (variance.some((p) => p.length !== n)) throw new ImagingError("size-mismatch", "variance planes differ in size");
  const out = new Float32Array(n);
  const [kr, kg, kb] = LUMINANCE_WEIGHTS.map((k) => k * k);
  for (let i = 0; i < n; i++) out[i] = kr * variance[0][i] + kg * variance[1][i] + kb * variance[2][i];
  return out;
}

/**
 * Per-pixel noise variance estimated from the image itself, for when the merge
 * gives none. The finest diagonal wavelet detail of a 2 x 2 block,
 * HH = (a - b - c + d) / 2, has the variance sigma^2 of white noise and almost
 * nothing of a smooth image (Donoho and Johnstone 1994, Biometrika 81:425,
 * estimate the noise from these coefficients; from memory). The difference of
 * two neighbouring, non-overlapping blocks, (HH(x) - HH(x + 2)) / sqrt 2, keeps
 * the variance sigma^2 and also cancels the smooth mixed curvature of the steep
 * inner corona. Its square is averaged over a Gaussian window of windowPx over
 * valid pixels. Noise that resampling has correlated between neighbours is
 * underestimated (interpolation smooths the finest scale): prefer the merge's
 * own variance when there is one.
 */
export function estimateNoiseVariance(plane: Float32Array, width: number, height: number, valid?: Uint8Array, windowPx = 4, runner: PlaneRunner = SERIAL_PLANE_RUNNER): Float32Array {
  requireNumberInRange("windowPx", windowPx, 1, 1000);
  const n = width * height;
  if (plane.length !== n) throw new ImagingError("size-mismatch", `plane has ${plane.length} values, expected ${width} x ${height}`);
  const hh = runner.float32(n);
  const hasHh = runner.uint8(n);
  runner.run(NOISE_DETAIL, { plane, valid, hh, hasHh, width }, height - 1);
  const sq = runner.float32(n);
  const weight = runner.float32(n);
  runner.run(NOISE_SQUARES, { hh, hasHh, sq, weight, width }, height);
  // The blurs work in place and the result goes into hh's buffer: at 24 megapixels the
  // estimate then peaks near 400 MB instead of 700 (the same numbers).
  const scratch = runner.float32(n, true);
  const sqBlur = blurGaussianFast(sq, width, height, windowPx, sq, scratch, runner);
  const wBlur = blurGaussianFast(weight, width, height, windowPx, weight, scratch, runner);
  // Where no block was usable nearby, the median of the estimates stands in.
  const estimates: number[] = [];
  for (let i = 0; i < n; i += 97) if (wBlur[i] > 0.05) estimates.push(sqBlur[i] / wBlur[i]);
  estimates.sort((a, b) => a - b);
  const fallback = estimates.length > 0 ? estimates[estimates.length >> 1] : 0;
  const out = hh;
  runner.run(NOISE_RATIO, { sqBlur, wBlur, out, fallback }, n);
  runner.release(hasHh, sq, weight, scratch);
  return out;
}

/** The finest diagonal detail HH of the 2 x 2 blocks starting on rows [start, end) where all four pixels are valid. */
const NOISE_DETAIL = definePlaneKernel<{ plane: Float32Array; valid?: Uint8Array; hh: Float32Array; hasHh: Uint8Array; width: number }>("noise-detail", (args, start, end) => {
  const { plane, valid, hh, hasHh, width } = args;
  const ok = (i: number) => !valid || valid[i] === 1;
  for (let y = start; y < end; y++) {
    for (let x = 0; x + 1 < width; x++) {
      const i = y * width + x;
      if (!(ok(i) && ok(i + 1) && ok(i + width) && ok(i + width + 1))) continue;
      hh[i] = (plane[i] - plane[i + 1] - plane[i + width] + plane[i + width + 1]) / 2;
      hasHh[i] = 1;
    }
  }
});

/** Half the squared difference of neighbouring blocks' HH on rows [start, end), centred on the 4 x 2 block, with its weight. */
const NOISE_SQUARES = definePlaneKernel<{ hh: Float32Array; hasHh: Uint8Array; sq: Float32Array; weight: Float32Array; width: number }>("noise-squares", (args, start, end) => {
  const { hh, hasHh, sq, weight, width } = args;
  for (let y = start; y < end; y++) {
    for (let x = 0; x + 2 < width; x++) {
      const i = y * width + x;
      if (!hasHh[i] || !hasHh[i + 2]) continue;
      const d = hh[i] - hh[i + 2];
      // Centred on the middle of the 4 x 2 block.
      const c = i + 1;
      sq[c] = (d * d) / 2;
      weight[c] = 1;
    }
  }
});

/** The windowed mean square over pixels [start, end), or the fallback where the window held too few blocks. */
const NOISE_RATIO = definePlaneKernel<{ sqBlur: Float32Array; wBlur: Float32Array; out: Float32Array; fallback: number }>("noise-ratio", (args, start, end) => {
  const { sqBlur, wBlur, out, fallback } = args;
  for (let i = start; i < end; i++) out[i] = wBlur[i] > 0.05 ? Math.max(0, sqBlur[i] / wBlur[i]) : fallback;
});

export const NOISE_KERNELS = [NOISE_DETAIL, NOISE_SQUARES, NOISE_RATIO];

export interface StructureMaskOptions {
  lunarDisk?: LunarDisk;
  /** Pixels this close to the canvas edge are left out, px; default 4 (frames shifted by a few pixels cover the edge with fewer exposures). */
  edgeBandPx?: number;
}

/**
 * Pixels the structure rendition may show: covered by at least one well-exposed
 * frame (coverage above 0), off the lunar disk, and clear of a band along the
 * canvas edge. Everything else is masked (black), never enhanced.
 */
export function createStructureMask(width: number, height: number, coverage: Uint16Array, options: StructureMaskOptions = {}): Uint8Array {
  const band = options.edgeBandPx ?? 4;
  requireNumberInRange("edgeBandPx", band, 0, Math.min(width, height) / 2);
  if (coverage.length !== width * height) throw new ImagingError("size-mismatch", `coverage has ${coverage.length} values, expected ${width} x ${height}`);
  const out = new Uint8Array(width * height);
  const disk = options.lunarDisk;
  const r2 = disk ? disk.radiusPx * disk.radiusPx : -1;
  for (let y = 0; y < height; y++) {
    // A row farther from the disk's centre than its radius has no pixel on it (a square is never negative).
    const dy2 = disk ? (y - disk.y) ** 2 : 0;
    const crossesDisk = disk !== undefined && dy2 <= r2;
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (!coverage[i]) continue;
      if (x < band || y < band || x >= width - band || y >= height - band) continue;
      if (crossesDisk && (x - disk.x) ** 2 + dy2 <= r2) continue;
      out[i] = 1;
    }
  }
  return out;
}

export interface LocalDenoiseOptions {
  valid?: Uint8Array;
  /** Noise variance per pixel, the plane's units squared; estimated from the plane when absent. */
  noiseVariance?: Float32Array;
  /** Width (sigma) of the local window, px; default 2.5. */
  widthPx?: number;
}

/**
 * Local Wiener (Lee) filter: out = m + g (B - m), m the local mean and g =
 * S / (S + N) with S = max(0, v - 1.5 N), v the local variance and N the noise
 * variance that survives B - m (Lee 1980, IEEE PAMI 2:165, from memory; the
 * factor 1.5 as in MGN's weighting, see radial.ts). Where structure stands
 * above the noise the pixel is kept; where only noise is left it moves to
 * the local mean. Windows are normalized over valid pixels; invalid pixels
 * are returned unchanged.
 */
export function denoiseLocally(plane: Float32Array, width: number, height: number, options: LocalDenoiseOptions = {}): Float32Array {
  const w = options.widthPx ?? 2.5;
  requireNumberInRange("widthPx", w, 0.5, 1000);
  const n = width * height;
  if (plane.length !== n) throw new ImagingError("size-mismatch", `plane has ${plane.length} values, expected ${width} x ${height}`);
  const valid = options.valid;
  if (options.noiseVariance && options.noiseVariance.length !== n) throw new ImagingError("size-mismatch", `noiseVariance has ${options.noiseVariance.length} values, expected ${width} x ${height}`);
  const noise = options.noiseVariance ?? estimateNoiseVariance(plane, width, height, valid);
  // Work relative to the valid mean so that float32 blurs keep their precision.
  let sum = 0, count = 0;
  for (let i = 0; i < n; i++) if (!valid || valid[i]) { sum += plane[i]; count++; }
  const offset = count > 0 ? sum / count : 0;
  const data = new Float32Array(n), weight = new Float32Array(n);
  for (let i = 0; i < n; i++) if (!valid || valid[i]) { data[i] = plane[i] - offset; weight[i] = 1; }
  const scratch = new Float32Array(n);
  const norm = blurGaussianFast(weight, width, height, w, undefined, scratch);
  const mean = blurGaussianFast(data, width, height, w, undefined, scratch);
  const sq = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    mean[i] = norm[i] > 1e-6 ? mean[i] / norm[i] : 0;
    if (weight[i]) sq[i] = (data[i] - mean[i]) ** 2;
  }
  const localVar = blurGaussianFast(sq, width, height, w, sq, scratch);
  const nu = Math.max(0, 1 - 3 / (4 * Math.PI * w * w));
  const out = Float32Array.from(plane);
  for (let i = 0; i < n; i++) {
    if (!weight[i] || !(norm[i] > 1e-6)) continue;
    const v = localVar[i] / norm[i];
    const noiseVar = nu * noise[i];
    const signal = Math.max(0, v - 1.5 * noiseVar);
    const gain = signal + noiseVar > 0 ? signal / (signal + noiseVar) : 1;
    out[i] = offset + mean[i] + gain * (data[i] - mean[i]);
  }
  return out;
}
