// Fast Fourier transforms and phase correlation, Float64.
import { ImagingError } from "./errors";

export function nextPowerOfTwo(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}

const twiddleCache = new Map<number, { cos: Float64Array; sin: Float64Array }>();
function getTwiddles(n: number) {
  let t = twiddleCache.get(n);
  if (!t) {
    const cos = new Float64Array(n / 2);
    const sin = new Float64Array(n / 2);
    for (let k = 0; k < n / 2; k++) {
      cos[k] = Math.cos((2 * Math.PI * k) / n);
      sin[k] = Math.sin((2 * Math.PI * k) / n);
    }
    t = { cos, sin };
    twiddleCache.set(n, t);
  }
  return t;
}

/**
 * In-place iterative radix-2 FFT (Cooley and Tukey 1965, Math. Comp. 19:297):
 * X[k] = sum_n x[n] exp(-2 pi i k n / N); the inverse uses +i and divides by N.
 */
export function transformFft(re: Float64Array, im: Float64Array, inverse = false): void {
  const n = re.length;
  if (n !== im.length || (n & (n - 1)) !== 0 || n === 0) throw new ImagingError("bad-parameter", `FFT length must be a power of two, got ${n}`);
  for (let i = 1, j = 0; i < n; i++) {
    let bit = n >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (i < j) {
      let t = re[i]; re[i] = re[j]; re[j] = t;
      t = im[i]; im[i] = im[j]; im[j] = t;
    }
  }
  const { cos, sin } = getTwiddles(n);
  const sign = inverse ? 1 : -1;
  for (let size = 2; size <= n; size *= 2) {
    const half = size >> 1;
    const step = n / size;
    for (let start = 0; start < n; start += size) {
      for (let k = 0; k < half; k++) {
        const wr = cos[k * step];
        const wi = sign * sin[k * step];
        const a = start + k;
        const b = a + half;
        const xr = re[b] * wr - im[b] * wi;
        const xi = re[b] * wi + im[b] * wr;
        re[b] = re[a] - xr;
        im[b] = im[a] - xi;
        re[a] += xr;
        im[a] += xi;
      }
    }
  }
  if (inverse) {
    for (let i = 0; i < n; i++) {
      re[i] /= n;
      im[i] /= n;
    }
  }
}

/** 2-D FFT of row-major data (width and height powers of two): rows, then columns. */
export function transformFft2d(re: Float64Array, im: Float64Array, width: number, height: number, inverse = false): void {
  const rowRe = new Float64Array(width);
  const rowIm = new Float64Array(width);
  for (let y = 0; y < height; y++) {
    const o = y * width;
    for (let x = 0; x < width; x++) { rowRe[x] = re[o + x]; rowIm[x] = im[o + x]; }
    transformFft(rowRe, rowIm, inverse);
    for (let x = 0; x < width; x++) { re[o + x] = rowRe[x]; im[o + x] = rowIm[x]; }
  }
  const colRe = new Float64Array(height);
  const colIm = new Float64Array(height);
  for (let x = 0; x < width; x++) {
    for (let y = 0; y < height; y++) { colRe[y] = re[y * width + x]; colIm[y] = im[y * width + x]; }
    transformFft(colRe, colIm, inverse);
    for (let y = 0; y < height; y++) { re[y * width + x] = colRe[y]; im[y * width + x] = colIm[y]; }
  }
}

export interface PhaseCorrelationPeak {
  dx: number;
  dy: number;
  /** Height of the correlation peak (1 for a perfect match, near 0 for no match). */
  peak: number;
}

// Sub-sample position of a peak from three samples: a Gaussian through them
// (parabola of logs) when all are positive, which fits the Gaussian-weighted
// correlation peak closely; else an ordinary parabola.
function interpolatePeak(left: number, centre: number, right: number): number {
  if (left > 0 && centre > 0 && right > 0) {
    const l = Math.log(left), c = Math.log(centre), r = Math.log(right);
    const den = l - 2 * c + r;
    if (den < 0) return Math.max(-0.5, Math.min(0.5, (0.5 * (l - r)) / den));
  }
  const den = left - 2 * centre + right;
  return den < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (left - right)) / den)) : 0;
}

const peakWeightCache = new Map<string, { weights: Float64Array; sum: number }>();

/**
 * The Gaussian weights exp(-2 pi^2 sigma^2 (u^2 + v^2)) of correlatePhase's
 * cross-power spectrum and their sum, made once per size and width: a
 * registration correlates many pairs of one size.
 */
function getPeakWeights(width: number, height: number, smoothSigma: number): { weights: Float64Array; sum: number } {
  const key = `${width}x${height}:${smoothSigma}`;
  let cached = peakWeightCache.get(key);
  if (!cached) {
    const s2 = 2 * Math.PI * Math.PI * smoothSigma * smoothSigma;
    const weights = new Float64Array(width * height);
    let sum = 0;
    for (let v = 0; v < height; v++) {
      const fv = (v <= height / 2 ? v : v - height) / height;
      for (let u = 0; u < width; u++) {
        const fu = (u <= width / 2 ? u : u - width) / width;
        const g = Math.exp(-s2 * (fu * fu + fv * fv));
        weights[v * width + u] = g;
        sum += g;
      }
    }
    // A few sizes at most in one process (the registration window's padded squares).
    if (peakWeightCache.size >= 8) peakWeightCache.clear();
    cached = { weights, sum };
    peakWeightCache.set(key, cached);
  }
  return cached;
}

/**
 * Phase correlation (Kuglin and Hines 1975, Proc. IEEE Conf. Cybernetics and
 * Society): R = conj(A) B / |conj(A) B| has the inverse transform delta(x - d)
 * when b(x) = a(x - d). The normalized cross-power is weighted by a Gaussian
 * exp(-2 pi^2 sigma^2 (u^2 + v^2)) so the peak becomes a Gaussian of width
 * sigma, which sub-sample interpolation locates without the bias of a sinc peak.
 * Returns d (wrapped to -N/2..N/2). With maxShift the peak is sought only among
 * shifts no longer than that (samples): a caller that predicts the shift can
 * refuse a stronger but implausible peak from noise or mask edges.
 */
export function correlatePhase(a: Float64Array, b: Float64Array, width: number, height: number, smoothSigma = 1, maxShift = Infinity): PhaseCorrelationPeak {
  const n = width * height;
  if (a.length !== n || b.length !== n) throw new ImagingError("size-mismatch", `phase correlation inputs must be ${width} x ${height}`);
  const ar = Float64Array.from(a), ai = new Float64Array(n);
  const br = Float64Array.from(b), bi = new Float64Array(n);
  transformFft2d(ar, ai, width, height);
  transformFft2d(br, bi, width, height);
  const { weights, sum: gSum } = getPeakWeights(width, height, smoothSigma);
  // Regularized whitening, C / (|C| + eps) with eps a small share of the mean
  // |C|: bins that hold nothing but round-off or noise keep a small weight
  // instead of a unit weight with a random phase.
  let meanMag = 0;
  for (let i = 0; i < n; i++) meanMag += Math.hypot(ar[i] * br[i] + ai[i] * bi[i], ar[i] * bi[i] - ai[i] * br[i]);
  const eps = (0.01 * meanMag) / n + 1e-300;
  for (let i = 0; i < n; i++) {
    // conj(A) B
    const re = ar[i] * br[i] + ai[i] * bi[i];
    const im = ar[i] * bi[i] - ai[i] * br[i];
    const mag = Math.hypot(re, im);
    const g = weights[i];
    ar[i] = (re / (mag + eps)) * g;
    ai[i] = (im / (mag + eps)) * g;
  }
  transformFft2d(ar, ai, width, height, true);
  if (!(maxShift >= 0)) throw new ImagingError("bad-parameter", `maxShift must be a non-negative number of samples, got ${maxShift}`);
  const limit2 = maxShift * maxShift;
  let best = 0;
  for (let v = 0; v < height; v++) {
    const sv = v <= height / 2 ? v : v - height;
    for (let u = 0; u < width; u++) {
      const su = u <= width / 2 ? u : u - width;
      const i = v * width + u;
      if (su * su + sv * sv <= limit2 && ar[i] > ar[best]) best = i;
    }
  }
  const px = best % width;
  const py = (best / width) | 0;
  const at = (x: number, y: number) => ar[((y + height) % height) * width + ((x + width) % width)];
  const centre = at(px, py);
  const fx = interpolatePeak(at(px - 1, py), centre, at(px + 1, py));
  const fy = interpolatePeak(at(px, py - 1), centre, at(px, py + 1));
  let dx = px + fx;
  let dy = py + fy;
  if (dx > width / 2) dx -= width;
  if (dy > height / 2) dy -= height;
  // The peak of the Gaussian-weighted delta is sum g, not 1: report it normalized.
  return { dx, dy, peak: (centre * n) / gSum };
}
