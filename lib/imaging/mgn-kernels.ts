// Multi-scale Gaussian normalization's per-pixel steps (applyMgn in radial.ts),
// as kernels over ranges of pixel indices: every pixel's arithmetic is its own,
// so a runner may spread them over threads with the same numbers bit for bit.
import { definePlaneKernel } from "./plane-runner";

/**
 * arctan by the polynomial of Abramowitz and Stegun (1964), Handbook of
 * Mathematical Functions, 4.4.49: arctan x = x + a2 x^3 + ... + a16 x^17 for
 * 0 <= x <= 1, |error| <= 2e-8, with arctan x = pi/2 - arctan(1/x) above 1. MGN
 * takes six arctangents per pixel; this is several times cheaper than Math.atan.
 */
export function computeArctan(x: number): number {
  const ax = x < 0 ? -x : x;
  const t = ax > 1 ? 1 / ax : ax;
  const t2 = t * t;
  const p =
    t * (1 + t2 * (-0.3333314528 + t2 * (0.1999355085 + t2 * (-0.1420889944 + t2 * (0.1065626393 + t2 * (-0.07528964 + t2 * (0.0429096138 + t2 * (-0.0161657367 + t2 * 0.0028662257))))))));
  const r = ax > 1 ? Math.PI / 2 - p : p;
  return x < 0 ? -r : r;
}


/** The plane shifted and scaled to (B - a0) / range on valid pixels (0 elsewhere, as allocated). */
export const MGN_SCALE = definePlaneKernel<{ plane: Float32Array; valid: Uint8Array; masked: Float32Array; a0: number; range: number }>("mgn-scale", (args, start, end) => {
  const { plane, valid, masked, a0, range } = args;
  // Shift by a0 before blurring: the same numbers for B and a B + b up to scale, which keeps float error low.
  for (let i = start; i < end; i++) if (valid[i]) masked[i] = (plane[i] - a0) / range;
});

/**
 * One width's difference from the local mean, B - (B * k_w) / (m * k_w), where
 * the mask's blur is usable (0 elsewhere), its square into `local` (read as
 * the local mean, written as the square to blur next), and with `leeMean` the
 * local mean itself.
 */
export const MGN_DETAIL = definePlaneKernel<{ valid: Uint8Array; norm: Float32Array; masked: Float32Array; local: Float32Array; diff: Float32Array; leeMean?: Float32Array }>("mgn-detail", (args, start, end) => {
  const { valid, norm, masked, local, diff, leeMean } = args;
  for (let i = start; i < end; i++) {
    diff[i] = valid[i] && norm[i] > 1e-6 ? masked[i] - local[i] / norm[i] : 0;
    if (leeMean) leeMean[i] = masked[i] - diff[i];
    local[i] = diff[i] * diff[i];
  }
});

/**
 * One width's arctan term, weighted by the Wiener gain S / (S + N_w) when there
 * is a noise estimate, added to `sumArctan`. With `lee` (the Lee estimate's
 * width; it holds that width's local mean from MGN_DETAIL, and `masked` comes
 * with it) the mean becomes the Lee estimate itself, mean + gain (B - mean), in
 * place: one plane kept to the end instead of the mean and the gain. See applyMgn.
 */
export const MGN_WEIGH = definePlaneKernel<{
  valid: Uint8Array; norm: Float32Array; localVar: Float32Array; diff: Float32Array; sumArctan: Float32Array;
  noise?: Float32Array; lee?: Float32Array; masked?: Float32Array; nu: number; k: number; oversubtraction: number;
}>("mgn-weigh", (args, start, end) => {
  const { valid, norm, localVar, diff, sumArctan, noise, lee, masked, nu, k, oversubtraction } = args;
  for (let i = start; i < end; i++) {
    if (!valid[i]) continue;
    const variance = norm[i] > 1e-6 ? Math.max(0, localVar[i] / norm[i]) : 0;
    const sd = Math.sqrt(variance);
    let gain = 1;
    if (noise) {
      const noiseVar = nu * noise[i];
      const signal = Math.max(0, variance - oversubtraction * noiseVar);
      gain = signal + noiseVar > 0 ? signal / (signal + noiseVar) : 1;
      // The gain as a float32 plane held it when mean and gain were kept apart.
      if (lee) lee[i] = lee[i] + Math.fround(gain) * (masked![i] - lee[i]);
    }
    sumArctan[i] += sd > 0 ? gain * computeArctan((k * diff[i]) / sd) : 0;
  }
});

/** I = h C'_g + ((1 - h) / n) sum_w arctan(k C_w) on valid pixels, 0 elsewhere; C'_g of the Lee estimate (MGN_WEIGH's `lee`) when there is one. */
export const MGN_COMBINE = definePlaneKernel<{
  valid: Uint8Array; masked: Float32Array; sumArctan: Float32Array; data: Float32Array;
  lee?: Float32Array; h: number; invGamma: number; widths: number;
}>("mgn-combine", (args, start, end) => {
  const { valid, masked, sumArctan, data, lee, h, invGamma, widths } = args;
  for (let i = start; i < end; i++) {
    if (!valid[i]) { data[i] = 0; continue; }
    const b = lee ? lee[i] : masked[i];
    const g = Math.pow(Math.max(0, b), invGamma);
    data[i] = h * g + ((1 - h) / widths) * sumArctan[i];
  }
});

/**
 * Per row of [start, end): the least and greatest plane value over valid pixels
 * (Infinity and -Infinity when none), found as a scan in raster order finds them
 * (strict comparisons, so of equal values the first stays), and the first and last
 * column of an invalid pixel (-1 when none). Taken over the rows in order they give
 * the whole plane's, as one scan would.
 */
export const MGN_ROW_EXTENTS = definePlaneKernel<{ plane: Float32Array; valid: Uint8Array; width: number; low: Float64Array; high: Float64Array; firstMasked: Float64Array; lastMasked: Float64Array }>("mgn-row-extents", (args, start, end) => {
  const { plane, valid, width, low, high, firstMasked, lastMasked } = args;
  for (let y = start; y < end; y++) {
    let a0 = Infinity, a1 = -Infinity, x0 = -1, x1 = -1;
    const o = y * width;
    for (let x = 0; x < width; x++) {
      if (!valid[o + x]) {
        if (x0 < 0) x0 = x;
        x1 = x;
        continue;
      }
      const v = plane[o + x];
      if (v < a0) a0 = v;
      if (v > a1) a1 = v;
    }
    low[y] = a0;
    high[y] = a1;
    firstMasked[y] = x0;
    lastMasked[y] = x1;
  }
});

/** out[i] = value over pixels [start, end) (a fill of shared memory as a loop: the builtin's goes element by element there). */
export const FILL_PLANE = definePlaneKernel<{ out: Float32Array; value: number }>("fill-plane", (args, start, end) => {
  const { out, value } = args;
  for (let i = start; i < end; i++) out[i] = value;
});
