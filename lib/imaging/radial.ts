// Radial filters that reveal coronal structure, computed about the Sun's centre
// with the lunar disk masked.
import { blurGaussianFast } from "./blur";
import { FILL_PLANE, MGN_COMBINE, MGN_DETAIL, MGN_ROW_EXTENTS, MGN_SCALE, MGN_WEIGH } from "./mgn-kernels";
import { SERIAL_PLANE_RUNNER, type PlaneRunner } from "./plane-runner";
import { ImagingError, requireNumberInRange } from "./errors";
import { denoiseLocally, estimateNoiseVariance } from "./structure-noise";
import { computePercentiles } from "./tone";

export interface LunarDisk {
  x: number;
  y: number;
  radiusPx: number;
}

export interface FilteredPlane {
  data: Float32Array;
  /** 1 where the filter has a value; 0 on the lunar disk and where statistics were missing. */
  valid: Uint8Array;
}

/** Valid-pixel mask: the given mask (if any) minus the lunar disk (if any); written into `into` when given (width x height). */
export function createValidMask(width: number, height: number, lunarDisk?: LunarDisk, valid?: Uint8Array, into?: Uint8Array): Uint8Array {
  if (valid && valid.length !== width * height) throw new ImagingError("size-mismatch", `valid mask has ${valid.length} values, expected ${width} x ${height}`);
  if (into && into.length !== width * height) throw new ImagingError("size-mismatch", `the mask's buffer has ${into.length} values, expected ${width} x ${height}`);
  const out = into ?? new Uint8Array(width * height);
  if (valid) out.set(valid);
  else out.fill(1);
  if (lunarDisk) {
    const r2 = lunarDisk.radiusPx * lunarDisk.radiusPx;
    for (let y = 0; y < height; y++) {
      const dy2 = (y - lunarDisk.y) ** 2;
      if (dy2 > r2) continue;
      for (let x = 0; x < width; x++) if ((x - lunarDisk.x) ** 2 + dy2 <= r2) out[y * width + x] = 0;
    }
  }
  return out;
}

export interface NrgfOptions {
  sunCentre: { x: number; y: number };
  lunarDisk?: LunarDisk;
  valid?: Uint8Array;
  /** Width of the radial bins, px; default 1. */
  binWidthPx?: number;
  /** Noise variance of each pixel of `plane`, its units squared; estimated from the plane when absent. */
  noiseVariance?: Float32Array;
  /**
   * Filter the plane by the local signal-to-noise ratio first (denoiseLocally),
   * so the normalization does not lift the outer field's noise into grain; default true.
   */
  snrWeighting?: boolean;
}

/**
 * Normalizing-radial-graded filter, Morgan, Habbal and Woo (2006), Solar Physics
 * 236:263: I'(r, phi) = (I(r, phi) - <I(r)>_phi) / sigma_phi(I(r)). Mean and
 * standard deviation over position angle are taken in rings of binWidthPx and
 * interpolated linearly in radius between ring mean radii, so a steep radial
 * fall-off inside a ring does not leak into the result. With snrWeighting
 * (default) the plane is first filtered by its local signal-to-noise ratio
 * (denoiseLocally), our addition.
 */
export function applyNrgf(plane: Float32Array, width: number, height: number, options: NrgfOptions): FilteredPlane {
  const binWidth = options.binWidthPx ?? 1;
  requireNumberInRange("binWidthPx", binWidth, 0.25, 1000);
  const { x: cx, y: cy } = options.sunCentre;
  if (!Number.isFinite(cx) || !Number.isFinite(cy)) throw new ImagingError("bad-parameter", `sunCentre must be finite, got (${cx}, ${cy})`);
  if (plane.length !== width * height) throw new ImagingError("size-mismatch", `plane has ${plane.length} values, expected ${width} x ${height}`);
  const valid = createValidMask(width, height, options.lunarDisk, options.valid);
  if (options.snrWeighting ?? true) plane = denoiseLocally(plane, width, height, { valid, noiseVariance: options.noiseVariance });
  const maxR = Math.hypot(Math.max(cx, width - 1 - cx), Math.max(cy, height - 1 - cy));
  const bins = Math.ceil(maxR / binWidth) + 2;
  const count = new Float64Array(bins), sumR = new Float64Array(bins), sum = new Float64Array(bins), sum2 = new Float64Array(bins);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (!valid[i]) continue;
      const r = Math.hypot(x - cx, y - cy);
      const b = Math.floor(r / binWidth);
      const v = plane[i];
      count[b]++;
      sumR[b] += r;
      sum[b] += v;
      sum2[b] += v * v;
    }
  }
  // Ring statistics, kept only for rings with enough pixels to speak for all position angles.
  const ringR: number[] = [], ringMean: number[] = [], ringStd: number[] = [];
  for (let b = 0; b < bins; b++) {
    if (count[b] < 8) continue;
    const mean = sum[b] / count[b];
    const variance = sum2[b] / count[b] - mean * mean;
    if (!(variance > 0)) continue;
    ringR.push(sumR[b] / count[b]);
    ringMean.push(mean);
    ringStd.push(Math.sqrt(variance));
  }
  const data = new Float32Array(width * height);
  const out = new Uint8Array(width * height);
  if (ringR.length < 2) return { data, valid: out };
  let k = 0;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (!valid[i]) continue;
      const r = Math.hypot(x - cx, y - cy);
      if (r < ringR[0] || r > ringR[ringR.length - 1]) continue;
      // Rings are sorted by radius; walk to the pair around r (search from the last position).
      if (k >= ringR.length - 1 || ringR[k] > r) k = 0;
      while (k < ringR.length - 2 && ringR[k + 1] < r) k++;
      const f = (r - ringR[k]) / (ringR[k + 1] - ringR[k]);
      const mean = ringMean[k] + f * (ringMean[k + 1] - ringMean[k]);
      const std = ringStd[k] + f * (ringStd[k + 1] - ringStd[k]);
      data[i] = (plane[i] - mean) / std;
      out[i] = 1;
    }
  }
  return { data, valid: out };
}

/**
 * The valid-pixel weight (1 valid, 0 not) blurred by a Gaussian of width w,
 * computed only in the masked pixels' bounding box grown by 5 w (beyond it the
 * blur of an all-ones field is 1 to within exp(-12.5)); 1 elsewhere. For a lunar
 * disk in a large frame this saves most of one of MGN's three blurs per width,
 * and no full plane of weights is kept.
 */
function blurMaskWeight(
  valid: Uint8Array,
  width: number,
  height: number,
  w: number,
  box: { x0: number; y0: number; x1: number; y1: number },
  out: Float32Array,
  scratch: Float32Array,
  runner: PlaneRunner,
): void {
  runner.run(FILL_PLANE, { out, value: 1 }, out.length);
  if (box.x1 < 0) return;
  const margin = Math.ceil(5 * w);
  const x0 = Math.max(0, box.x0 - margin), x1 = Math.min(width - 1, box.x1 + margin);
  const y0 = Math.max(0, box.y0 - margin), y1 = Math.min(height - 1, box.y1 + margin);
  const sw = x1 - x0 + 1, sh = y1 - y0 + 1;
  if (sw < 2 || sh < 2) return;
  const sub = runner.float32(sw * sh, true);
  for (let y = 0; y < sh; y++) {
    const from = (y + y0) * width + x0;
    for (let x = 0; x < sw; x++) sub[y * sw + x] = valid[from + x] ? 1 : 0;
  }
  const blurred = blurGaussianFast(sub, sw, sh, w, sub, scratch, runner);
  for (let y = 0; y < sh; y++) out.set(blurred.subarray(y * sw, (y + 1) * sw), (y + y0) * width + x0);
  runner.release(sub);
}

export interface MgnOptions {
  lunarDisk?: LunarDisk;
  valid?: Uint8Array;
  /** arctan steepness k; default 0.7. */
  k?: number;
  /** Weight of the gamma-stretched global image h; default 0.7. */
  h?: number;
  /** Gamma of the global image; default 3.2. */
  gamma?: number;
  /** Gaussian kernel widths w (sigma), px; default 1.25, 2.5, 5, 10, 20, 40. */
  widthsPx?: number[];
  /**
   * Noise variance of each pixel of `plane`, in its units squared (from the
   * merge; see combineLuminanceVariance). Estimated from the plane itself when
   * absent (estimateNoiseVariance).
   */
  noiseVariance?: Float32Array;
  /** Weight each scale's enhancement by its local signal-to-noise ratio; default true. false gives the published filter unchanged. */
  snrWeighting?: boolean;
  /**
   * Runs the per-pixel steps and the blurs (on the calling thread when absent):
   * the same numbers with any runner. The result's planes are the runner's.
   */
  runner?: PlaneRunner;
  /**
   * `plane` is the runner's and the caller is done with it: it is released as soon
   * as it is scaled, so that it does not sit beside the filter's working planes.
   */
  releasePlane?: boolean;
}

/**
 * The signal variance is the local variance less this many times the expected
 * noise variance: the local variance is itself estimated from a few dozen
 * pixels, and subtracting a little more than the mean noise keeps its chance
 * excesses from passing as structure (over-subtraction, as in spectral noise
 * subtraction, Berouti, Schwartz and Makhoul 1979, ICASSP; from memory).
 */
const NOISE_OVERSUBTRACTION = 1.5;
/** Width of the Lee estimate behind MGN's gamma image, px: wide enough to smooth noise where no structure stands out. */
const LEE_WIDTH_PX = 5;

export { computeArctan } from "./mgn-kernels";

/** Defaults from memory of Morgan and Druckmueller (2014) (REFERENCES.md). */
export const MGN_DEFAULTS = { k: 0.7, h: 0.7, gamma: 3.2, widthsPx: [1.25, 2.5, 5, 10, 20, 40] };

/**
 * Multi-scale Gaussian normalization, Morgan and Druckmueller (2014), Solar
 * Physics 289:2945:
 *   C_w = (B - B * k_w) / sqrt((B - B * k_w)^2 * k_w)   (* = convolution, k_w a Gaussian of width w)
 *   I = h C'_g + ((1 - h) / n) sum_w arctan(k C_w)
 * with C'_g = ((B - a0) / (a1 - a0))^(1/gamma), a0 and a1 the data's own minimum
 * and maximum over valid pixels (which makes the result invariant under
 * B -> a B + b, a > 0). Convolutions are normalized over valid pixels
 * (Knutsson and Westin 1993), so the dark lunar disk does not bleed into the
 * inner corona; blurs are recursive (Young and van Vliet 1995), the wide ones
 * on a reduced grid (blurGaussianFast).
 *
 * With snrWeighting (our addition, so that noise is not amplified into grain):
 * the local variance (B - B*k_w)^2 * k_w holds the signal's variance S and the
 * noise's, N_w = nu_w sigma^2 with nu_w = 1 - 3 / (4 pi w^2) the share of white
 * noise that survives B - B*k_w (derived: 1 - 2 k_w(0) + sum k_w^2 for a
 * Gaussian). Each scale's arctan term is weighted by the Wiener gain
 * S / (S + N_w), S = max(0, local variance - 1.5 N_w) (Lee 1980, IEEE PAMI
 * 2:165, from memory; see NOISE_OVERSUBTRACTION): 1 where structure stands
 * above the noise, towards 0 where only noise is left. The gamma image is taken
 * of the same Lee estimate at the width LEE_WIDTH_PX, mean + gain (B - mean),
 * so the global term is not grainy either.
 */
export function applyMgn(plane: Float32Array, width: number, height: number, options: MgnOptions = {}): FilteredPlane {
  const k = options.k ?? MGN_DEFAULTS.k;
  const h = options.h ?? MGN_DEFAULTS.h;
  const gamma = options.gamma ?? MGN_DEFAULTS.gamma;
  const widths = options.widthsPx ?? MGN_DEFAULTS.widthsPx;
  const runner = options.runner ?? SERIAL_PLANE_RUNNER;
  requireNumberInRange("k", k, 1e-6, 1e6);
  requireNumberInRange("h", h, 0, 1);
  requireNumberInRange("gamma", gamma, 1e-3, 1e3);
  if (!Array.isArray(widths) || widths.length === 0) throw new ImagingError("bad-parameter", "widthsPx must list at least one kernel width");
  widths.forEach((w, i) => requireNumberInRange(`widthsPx[${i}]`, w, 0.5, 1e4));
  if (plane.length !== width * height) throw new ImagingError("size-mismatch", `plane has ${plane.length} values, expected ${width} x ${height}`);
  const n = width * height;
  const valid = createValidMask(width, height, options.lunarDisk, options.valid, runner.uint8(n, true));
  // The valid values' range and the masked pixels' bounding box (the blurred mask differs from 1
  // only within a few widths of it), row by row, then over the rows in order as one scan finds them.
  const extents = { plane, valid, width, low: runner.float64(height, true), high: runner.float64(height, true), firstMasked: runner.float64(height, true), lastMasked: runner.float64(height, true) };
  runner.run(MGN_ROW_EXTENTS, extents, height);
  let a0 = Infinity, a1 = -Infinity;
  let bx0 = width, by0 = height, bx1 = -1, by1 = -1;
  for (let y = 0; y < height; y++) {
    if (extents.low[y] < a0) a0 = extents.low[y];
    if (extents.high[y] > a1) a1 = extents.high[y];
    if (extents.firstMasked[y] < 0) continue;
    if (extents.firstMasked[y] < bx0) bx0 = extents.firstMasked[y];
    if (extents.lastMasked[y] > bx1) bx1 = extents.lastMasked[y];
    if (y < by0) by0 = y;
    by1 = y;
  }
  runner.release(extents.low, extents.high, extents.firstMasked, extents.lastMasked);
  if (!(a1 > a0)) {
    if (options.releasePlane) runner.release(plane);
    return { data: new Float32Array(n), valid };
  }
  const range = a1 - a0;
  const masked = runner.float32(n);
  runner.run(MGN_SCALE, { plane, valid, masked, a0, range }, n);
  if (options.releasePlane) runner.release(plane);
  // Noise variance in the units of `masked` ((B - a0) / range), smoothed over a few pixels.
  let noise: Float32Array | undefined;
  if (options.snrWeighting ?? true) {
    if (options.noiseVariance) {
      if (options.noiseVariance.length !== n) throw new ImagingError("size-mismatch", `noiseVariance has ${options.noiseVariance.length} values, expected ${width} x ${height}`);
      const scaled = runner.float32(n);
      const w = runner.float32(n);
      const inv = 1 / (range * range);
      for (let i = 0; i < n; i++) if (valid[i] && options.noiseVariance[i] >= 0) { scaled[i] = options.noiseVariance[i] * inv; w[i] = 1; }
      const scratchN = runner.float32(n, true);
      const num = blurGaussianFast(scaled, width, height, 2, scaled, scratchN, runner);
      const den = blurGaussianFast(w, width, height, 2, w, scratchN, runner);
      for (let i = 0; i < n; i++) num[i] = den[i] > 1e-6 ? num[i] / den[i] : 0;
      runner.release(den, scratchN);
      noise = num;
    } else noise = estimateNoiseVariance(masked, width, height, valid, undefined, runner);
  }
  // The finest width's local mean and gain give the Lee estimate behind the gamma image.
  const leeWidth = widths.reduce((best, w) => (w <= LEE_WIDTH_PX && w > best ? w : best), Math.min(...widths));
  // The Lee estimate: that width's local mean, made mean + gain (B - mean) in place by MGN_WEIGH.
  let lee: Float32Array | undefined;
  const sumArctan = runner.float32(n);
  const diff = runner.float32(n, true);
  // Buffers reused for every width (see blurGaussian on why), each written whole before it is read.
  const norm = runner.float32(n, true);
  const local = runner.float32(n, true);
  const scratch = runner.float32(n, true);
  for (const w of widths) {
    blurMaskWeight(valid, width, height, w, { x0: bx0, y0: by0, x1: bx1, y1: by1 }, norm, scratch, runner);
    blurGaussianFast(masked, width, height, w, local, scratch, runner);
    // The Lee estimate for the gamma image comes from the widest scale up to LEE_WIDTH_PX (or the finest).
    const first = noise !== undefined && w === leeWidth;
    if (first) lee = runner.float32(n, true);
    runner.run(MGN_DETAIL, { valid, norm, masked, local, diff, leeMean: first ? lee : undefined }, n);
    const localVar = blurGaussianFast(local, width, height, w, local, scratch, runner);
    const nu = Math.max(0, 1 - 3 / (4 * Math.PI * w * w));
    runner.run(MGN_WEIGH, { valid, norm, localVar, diff, sumArctan, noise, lee: first ? lee : undefined, masked: first ? masked : undefined, nu, k, oversubtraction: NOISE_OVERSUBTRACTION }, n);
  }
  // The result takes the buffer of the per-width differences, which are done with.
  const data = diff;
  runner.run(MGN_COMBINE, { valid, masked, sumArctan, data, lee, h, invGamma: 1 / gamma, widths: widths.length }, n);
  runner.release(masked, noise, sumArctan, norm, local, scratch, lee);
  return { data, valid };
}

/**
 * NRGF with a strength, our own blend (no published recipe): NRGF's values are
 * scaled to 0..1 between their 0.5th and 99.5th percentiles over valid pixels
 * (clamped), then mixed with the gamma-stretched overall image as MGN mixes it:
 *   I = strength N' + (1 - strength) C'_g,  C'_g = ((B - a0) / (a1 - a0))^(1/gamma)
 * with a0, a1 the plane's minimum and maximum over the filter's valid pixels.
 * strength 1 gives NRGF alone (as the structure rendition stretches it);
 * smaller strengths keep more of the overall brightness fall-off.
 */
export function blendWithGlobalImage(filtered: FilteredPlane, plane: Float32Array, strength: number, gamma = MGN_DEFAULTS.gamma): FilteredPlane {
  requireNumberInRange("strength", strength, 0, 1);
  requireNumberInRange("gamma", gamma, 1e-3, 1e3);
  const { data, valid } = filtered;
  if (plane.length !== data.length) throw new ImagingError("size-mismatch", `plane has ${plane.length} values, the filtered plane ${data.length}`);
  if (strength === 1) return filtered;
  const [lo, hi] = computePercentiles(data, [0.5, 99.5], valid);
  let a0 = Infinity, a1 = -Infinity;
  for (let i = 0; i < plane.length; i++) {
    if (!valid[i]) continue;
    if (plane[i] < a0) a0 = plane[i];
    if (plane[i] > a1) a1 = plane[i];
  }
  const out = new Float32Array(data.length);
  if (!(a1 > a0)) return { data: out, valid };
  const span = hi > lo ? hi - lo : 1;
  const invGamma = 1 / gamma;
  for (let i = 0; i < out.length; i++) {
    if (!valid[i]) continue;
    const n = Math.min(1, Math.max(0, (data[i] - lo) / span));
    const g = Math.pow((plane[i] - a0) / (a1 - a0), invGamma);
    out[i] = strength * n + (1 - strength) * g;
  }
  return { data: out, valid };
}
