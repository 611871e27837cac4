// Pixel-by-pixel combination of a stack of calibration frames with outlier
// rejection, and the exact medians the calibration masters are normalised by.
// Pure: typed arrays in, typed arrays out.
import { ImagingError, requireNumberInRange } from "./errors";
import { selectKth } from "./select";

/**
 * Sigma clipping as astropy's sigma_clip does it (astropy.stats, version 5.2 as
 * shipped by Debian, called by ccdproc 2.4's Combiner.sigma_clipping): per pixel,
 * a centre and a spread of the values still kept; a value is rejected when it lies
 * strictly below centre - lowSigma x spread or strictly above centre + highSigma x
 * spread; repeated on the values kept until nothing more is rejected or maxRounds
 * is reached. As astropy's fast C path (used for these string options along an
 * axis) does, the last bounds then decide over all values, so a value rejected in an
 * early round is kept again when the later, tighter set gives wider bounds.
 *
 * The defaults are ccdproc's own (read in ccdproc/combiner.py of 2.4.0):
 * low_thresh = high_thresh = 3, func = "mean", dev_func = "std" (numpy's, ddof 0),
 * maxiters = 1. Its docstring says the centre defaults to the median, but the code
 * passes "mean"; we follow the code. A robust variant (centre "median", spread
 * "mad-std" = 1.482602218505602 x median absolute deviation, as astropy's
 * mad_std, and a few rounds) is one option away.
 */
export interface SigmaClipOptions {
  /** Rejection below the centre, in units of the spread; default 3 (ccdproc). */
  lowSigma?: number;
  /** Rejection above the centre, in units of the spread; default 3 (ccdproc). */
  highSigma?: number;
  /** Centre of the clipping: "mean" (ccdproc's default) or "median". */
  centre?: "mean" | "median";
  /** Spread: "std" (ccdproc's default, population standard deviation) or "mad-std". */
  spread?: "std" | "mad-std";
  /** Rounds of clipping; default 1 (ccdproc passes maxiters = 1 to astropy). */
  maxRounds?: number;
}

export const CCDPROC_CLIP_DEFAULTS: Required<SigmaClipOptions> = { lowSigma: 3, highSigma: 3, centre: "mean", spread: "std", maxRounds: 1 };

/** astropy.stats.mad_std: the MAD scaled to a Gaussian's standard deviation, 1 / Phi^-1(3/4). */
export const MAD_TO_SIGMA = 1.482602218505602;

export interface CombinedStack {
  /** The median of the values kept at each pixel. */
  combined: Float32Array;
  /** Rejected values over all values of the stack. */
  rejectedFraction: number;
}

function resolveClipOptions(options: SigmaClipOptions | undefined): Required<SigmaClipOptions> {
  const o = { ...CCDPROC_CLIP_DEFAULTS, ...options };
  requireNumberInRange("lowSigma", o.lowSigma, 0.5, 100);
  requireNumberInRange("highSigma", o.highSigma, 0.5, 100);
  requireNumberInRange("maxRounds", o.maxRounds, 1, 100);
  if (o.centre !== "mean" && o.centre !== "median") throw new ImagingError("bad-parameter", `centre must be "mean" or "median", got ${String(o.centre)}`);
  if (o.spread !== "std" && o.spread !== "mad-std") throw new ImagingError("bad-parameter", `spread must be "std" or "mad-std", got ${String(o.spread)}`);
  return o;
}

/** Sorts the first n entries in place (insertion sort: stacks hold a few dozen values at most). */
function sortSmall(a: Float64Array, n: number): void {
  for (let i = 1; i < n; i++) {
    const v = a[i];
    let j = i - 1;
    while (j >= 0 && a[j] > v) {
      a[j + 1] = a[j];
      j--;
    }
    a[j + 1] = v;
  }
}

/** Median of the first n sorted entries; the mean of the middle two for an even count, as numpy's median. */
function medianOfSorted(a: Float64Array, n: number): number {
  const h = n >> 1;
  return n % 2 === 1 ? a[h] : (a[h - 1] + a[h]) / 2;
}

/**
 * Combines a stack of equally sized planes pixel by pixel: sigma clipping (see
 * SigmaClipOptions; ccdproc's defaults unless told otherwise), then the median of
 * the values kept, as ccdproc's Combiner.sigma_clipping() followed by
 * median_combine(). A pixel whose every value was rejected (which the strict
 * inequalities make impossible with the defaults) takes the median of all its values.
 */
export function combineSigmaClippedMedian(stack: Float32Array[], options?: SigmaClipOptions): CombinedStack {
  if (stack.length === 0) throw new ImagingError("too-few-frames", "combineSigmaClippedMedian: the stack is empty");
  const n = stack.length;
  const size = stack[0].length;
  stack.forEach((plane, k) => {
    if (plane.length !== size) throw new ImagingError("size-mismatch", `combineSigmaClippedMedian: plane ${k} has ${plane.length} pixels, plane 0 has ${size}`);
  });
  const o = resolveClipOptions(options);
  const values = new Float64Array(n);
  const kept = new Float64Array(n);
  const work = new Float64Array(n);
  const combined = new Float32Array(size);
  let rejected = 0;
  for (let i = 0; i < size; i++) {
    for (let k = 0; k < n; k++) values[k] = stack[k][i];
    let m = n;
    for (let k = 0; k < n; k++) kept[k] = values[k];
    let lo = -Infinity;
    let hi = Infinity;
    for (let round = 0; round < o.maxRounds && m > 0; round++) {
      let centre: number;
      let spread: number;
      if (o.centre === "mean" || o.spread === "std") {
        let sum = 0;
        for (let k = 0; k < m; k++) sum += kept[k];
        const mean = sum / m;
        let ss = 0;
        for (let k = 0; k < m; k++) ss += (kept[k] - mean) * (kept[k] - mean);
        centre = mean;
        spread = Math.sqrt(ss / m);
      } else {
        centre = 0;
        spread = 0;
      }
      if (o.centre === "median" || o.spread === "mad-std") {
        for (let k = 0; k < m; k++) work[k] = kept[k];
        sortSmall(work, m);
        const median = medianOfSorted(work, m);
        if (o.centre === "median") centre = median;
        if (o.spread === "mad-std") {
          // astropy's mad_std takes the deviations about the median, whatever the centre.
          for (let k = 0; k < m; k++) work[k] = Math.abs(kept[k] - median);
          sortSmall(work, m);
          spread = MAD_TO_SIGMA * medianOfSorted(work, m);
        }
      }
      lo = centre - o.lowSigma * spread;
      hi = centre + o.highSigma * spread;
      let next = 0;
      for (let k = 0; k < m; k++) if (!(kept[k] < lo || kept[k] > hi)) kept[next++] = kept[k];
      if (next === m) break;
      m = next;
    }
    // astropy's C implementation returns the last bounds and masks every value outside them:
    // a value rejected in an early round comes back when later bounds are wider.
    m = 0;
    for (let k = 0; k < n; k++) if (!(values[k] < lo || values[k] > hi)) kept[m++] = values[k];
    rejected += n - m;
    if (m === 0) {
      for (let k = 0; k < n; k++) kept[k] = values[k];
      m = n;
    }
    sortSmall(kept, m);
    combined[i] = medianOfSorted(kept, m);
  }
  return { combined, rejectedFraction: rejected / (n * size) };
}

/** Exact median of the values (where valid is 1, when given; NaN left out), as numpy's median; NaN when none. */
export function computeMedian(values: Float32Array, valid?: Uint8Array): number {
  const picked = new Float32Array(values.length);
  let count = 0;
  for (let i = 0; i < values.length; i++) if ((!valid || valid[i]) && !Number.isNaN(values[i])) picked[count++] = values[i];
  if (count === 0) return NaN;
  const a = picked.subarray(0, count);
  const h = count >> 1;
  selectKth(a, h);
  if (count % 2 === 1) return a[h];
  // Even count: the other middle value is the largest of those before a[h].
  let below = -Infinity;
  for (let i = 0; i < h; i++) if (a[i] > below) below = a[i];
  return (below + a[h]) / 2;
}

/** Median and robust spread (MAD x 1.4826, astropy's mad_std) of the values, optionally where valid is 1. */
export function computeRobustStats(values: Float32Array, valid?: Uint8Array): { median: number; sigma: number } {
  const median = computeMedian(values, valid);
  const dev = new Float32Array(values.length);
  for (let i = 0; i < values.length; i++) dev[i] = Math.abs(values[i] - median);
  return { median, sigma: MAD_TO_SIGMA * computeMedian(dev, valid) };
}
