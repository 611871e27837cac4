// Gaussian blur and mask morphology on planes.
import { ImagingError } from "./errors";
import { definePlaneKernel, SERIAL_PLANE_RUNNER, type PlaneRunner } from "./plane-runner";

interface RecursiveCoefficients {
  bb: number;
  c1: number;
  c2: number;
  c3: number;
}

/** The row pass of blurGaussian over rows [start, end) of `out`, in place: one line at a time in a Float64 buffer. */
export const BLUR_ROWS = definePlaneKernel<RecursiveCoefficients & { out: Float32Array; width: number }>("blur-rows", (args, start, end) => {
  const { out, width, bb, c1, c2, c3 } = args;
  const line = new Float64Array(width);
  for (let y = start; y < end; y++) {
    const o = y * width;
    let w1 = out[o], w2 = w1, w3 = w1;
    for (let x = 0; x < width; x++) {
      const w = bb * out[o + x] + c1 * w1 + c2 * w2 + c3 * w3;
      line[x] = w;
      w3 = w2; w2 = w1; w1 = w;
    }
    let y1 = line[width - 1], y2 = y1, y3 = y1;
    for (let x = width - 1; x >= 0; x--) {
      const v = bb * line[x] + c1 * y1 + c2 * y2 + c3 * y3;
      out[o + x] = v;
      y3 = y2; y2 = y1; y1 = v;
    }
  }
});

/**
 * The column pass of blurGaussian over columns [start, end) of `out`, in place
 * (the forward pass into `cols`): the range's columns advance together row by
 * row, which keeps memory access sequential within each row.
 */
export const BLUR_COLUMNS = definePlaneKernel<RecursiveCoefficients & { out: Float32Array; cols: Float32Array; width: number; height: number }>("blur-columns", (args, start, end) => {
  const { out, cols, width, height, bb, c1, c2, c3 } = args;
  const span = end - start;
  const p1 = new Float64Array(span), p2 = new Float64Array(span), p3 = new Float64Array(span);
  for (let j = 0; j < span; j++) p1[j] = p2[j] = p3[j] = out[start + j];
  for (let y = 0; y < height; y++) {
    const o = y * width + start;
    for (let j = 0; j < span; j++) {
      const w = bb * out[o + j] + c1 * p1[j] + c2 * p2[j] + c3 * p3[j];
      cols[o + j] = w;
      p3[j] = p2[j]; p2[j] = p1[j]; p1[j] = w;
    }
  }
  const last = (height - 1) * width + start;
  for (let j = 0; j < span; j++) p1[j] = p2[j] = p3[j] = cols[last + j];
  for (let y = height - 1; y >= 0; y--) {
    const o = y * width + start;
    for (let j = 0; j < span; j++) {
      const v = bb * cols[o + j] + c1 * p1[j] + c2 * p2[j] + c3 * p3[j];
      out[o + j] = v;
      p3[j] = p2[j]; p2[j] = p1[j]; p1[j] = v;
    }
  }
});

/**
 * Recursive Gaussian blur of Young and van Vliet (1995), "Recursive
 * implementation of the Gaussian filter", Signal Processing 44:139. Cost is
 * independent of sigma. With q = 0.98711 sigma - 0.96330 (sigma >= 2.5) or
 * 3.97156 - 4.14554 sqrt(1 - 0.26891 sigma) (0.5 <= sigma < 2.5):
 *   b0 = 1.57825 + 2.44413 q + 1.4281 q^2 + 0.422205 q^3
 *   b1 = 2.44413 q + 2.85619 q^2 + 1.26661 q^3
 *   b2 = -(1.4281 q^2 + 1.26661 q^3),  b3 = 0.422205 q^3
 *   B = 1 - (b1 + b2 + b3) / b0
 *   forward  w[n] = B x[n] + (b1 w[n-1] + b2 w[n-2] + b3 w[n-3]) / b0
 *   backward y[n] = B w[n] + (b1 y[n+1] + b2 y[n+2] + b3 y[n+3]) / b0
 * Edges are extended with the edge value (the filter's steady state).
 * Returns a new plane (or `out`); sigma 0 returns a copy. Rows, then columns:
 * each row's and each column's arithmetic is its own, so a runner may spread
 * them over threads (`out` and `scratch` then from the runner, as `plane` when
 * no `out` is given).
 */
export function blurGaussian(
  plane: Float32Array,
  width: number,
  height: number,
  sigmaPx: number,
  out?: Float32Array,
  scratch?: Float32Array,
  runner: PlaneRunner = SERIAL_PLANE_RUNNER,
): Float32Array {
  if (!(sigmaPx >= 0) || !Number.isFinite(sigmaPx)) throw new ImagingError("bad-parameter", `blur sigmaPx must be finite and >= 0, got ${sigmaPx}`);
  if (plane.length !== width * height) throw new ImagingError("bad-parameter", `blur: plane length ${plane.length} is not ${width} x ${height}`);
  // `out` and `scratch` let callers reuse large buffers: fresh 100 MB arrays cost page faults and GC.
  if (out) {
    if (out !== plane) out.set(plane);
  } else {
    out = runner.float32(plane.length, true);
    out.set(plane);
  }
  if (sigmaPx === 0) return out;
  if (sigmaPx < 0.5) throw new ImagingError("bad-parameter", `blur sigmaPx must be 0 or at least 0.5 (recursive filter range), got ${sigmaPx}`);
  const q = sigmaPx >= 2.5 ? 0.98711 * sigmaPx - 0.9633 : 3.97156 - 4.14554 * Math.sqrt(1 - 0.26891 * sigmaPx);
  const b0 = 1.57825 + 2.44413 * q + 1.4281 * q * q + 0.422205 * q * q * q;
  const c1 = (2.44413 * q + 2.85619 * q * q + 1.26661 * q * q * q) / b0;
  const c2 = -(1.4281 * q * q + 1.26661 * q * q * q) / b0;
  const c3 = (0.422205 * q * q * q) / b0;
  const bb = 1 - (c1 + c2 + c3);
  runner.run(BLUR_ROWS, { out, width, bb, c1, c2, c3 }, height);
  // Float32 halves the memory of a 24 Mpx plane; the error stays near 1e-7.
  const cols = scratch && scratch.length >= width * height ? scratch : runner.float32(width * height, true);
  runner.run(BLUR_COLUMNS, { out, cols, width, height, bb, c1, c2, c3 }, width);
  if (cols !== scratch) runner.release(cols);
  return out;
}

/**
 * blurGaussianFast's box average over the small grid's rows [start, end): each
 * cell sums its f x f pixels (rows in order, each row left to right) and is
 * divided by its area (f x f inside, less along the right and bottom edges).
 */
export const BOX_AVERAGE = definePlaneKernel<{ plane: Float32Array; sum: Float32Array; width: number; height: number; f: number; sw: number }>("box-average", (args, start, end) => {
  const { plane, sum, width, height, f, sw } = args;
  const shift = Math.log2(f);
  for (let y = start * f; y < Math.min(height, end * f); y++) {
    const row = (y >> shift) * sw;
    const o = y * width;
    for (let x = 0; x < width; x++) sum[row + (x >> shift)] += plane[o + x];
  }
  for (let j = start; j < end; j++) {
    const rows = Math.min(f, height - j * f);
    for (let i = 0; i < sw; i++) sum[j * sw + i] /= rows * Math.min(f, width - i * f);
  }
});

/** blurGaussianFast's bilinear interpolation of the small grid back to full rows [start, end). */
export const SPREAD_BILINEAR = definePlaneKernel<{ small: Float32Array; out: Float32Array; width: number; f: number; sw: number; sh: number }>("spread-bilinear", (args, start, end) => {
  const { small, out, width, f, sw, sh } = args;
  // Small cell j covers full pixels j f .. j f + f - 1, centred at j f + (f - 1) / 2.
  const x0 = new Int32Array(width);
  const fx = new Float32Array(width);
  for (let x = 0; x < width; x++) {
    let u = (x - (f - 1) / 2) / f;
    u = u < 0 ? 0 : u > sw - 1 ? sw - 1 : u;
    x0[x] = Math.min(sw - 2, Math.floor(u));
    fx[x] = u - x0[x];
  }
  for (let y = start; y < end; y++) {
    let v = (y - (f - 1) / 2) / f;
    v = v < 0 ? 0 : v > sh - 1 ? sh - 1 : v;
    const y0 = Math.min(sh - 2, Math.floor(v));
    const fy = v - y0;
    const r0 = y0 * sw;
    const r1 = r0 + sw;
    const o = y * width;
    for (let x = 0; x < width; x++) {
      const j = x0[x];
      const t = fx[x];
      const top = small[r0 + j] + t * (small[r0 + j + 1] - small[r0 + j]);
      const bottom = small[r1 + j] + t * (small[r1 + j + 1] - small[r1 + j]);
      out[o + x] = top + fy * (bottom - top);
    }
  }
});

/**
 * Wide Gaussian blurs on a reduced grid: box-average by f (a power of two with
 * f <= sigma / 2), blur there by sqrt(sigma^2 - (f^2 - 1) / 12) / f (a box of
 * f pixels already adds a variance of (f^2 - 1) / 12 px^2), and interpolate back
 * bilinearly. For sigma of 4 px and more this keeps the result within about 1 %
 * of the full blur's local contrast at a fraction of the cost; narrower blurs run
 * at full resolution. Every step is by rows or columns, so a runner may spread it
 * over threads (as blurGaussian).
 */
export function blurGaussianFast(
  plane: Float32Array,
  width: number,
  height: number,
  sigmaPx: number,
  out?: Float32Array,
  scratch?: Float32Array,
  runner: PlaneRunner = SERIAL_PLANE_RUNNER,
): Float32Array {
  let f = 1;
  while (f * 4 <= sigmaPx && f * 4 <= Math.min(width, height) / 8) f *= 2;
  if (f === 1) return blurGaussian(plane, width, height, sigmaPx, out, scratch, runner);
  const sw = Math.ceil(width / f);
  const sh = Math.ceil(height / f);
  const m = sw * sh;
  // The small grid's sums, blur and column pass fit in a full-size scratch (3 m <= 3 n / 4): no new arrays.
  const inScratch = scratch !== undefined && scratch.length >= 3 * m;
  const sum = inScratch ? scratch.subarray(0, m).fill(0) : runner.float32(m);
  runner.run(BOX_AVERAGE, { plane, sum, width, height, f, sw }, sh);
  const smallSigma = Math.sqrt(sigmaPx * sigmaPx - (f * f - 1) / 12) / f;
  const small = inScratch ? blurGaussian(sum, sw, sh, smallSigma, scratch.subarray(m, 2 * m), scratch.subarray(2 * m, 3 * m), runner) : blurGaussian(sum, sw, sh, smallSigma, undefined, undefined, runner);
  if (!inScratch) runner.release(sum);
  out ??= runner.float32(width * height, true);
  runner.run(SPREAD_BILINEAR, { small, out, width, f, sw, sh }, height);
  if (!inScratch) runner.release(small);
  return out;
}

/** The denominator of blurGaussianMasked, m * g: one blur serves every plane masked alike. */
export function blurMaskWeights(valid: Uint8Array, width: number, height: number, sigmaPx: number): Float32Array {
  const weights = new Float32Array(valid.length);
  for (let i = 0; i < valid.length; i++) if (valid[i]) weights[i] = 1;
  return blurGaussian(weights, width, height, sigmaPx, weights);
}

/**
 * Gaussian blur of the valid pixels only, by normalized convolution (Knutsson and
 * Westin 1993, CVPR): (m B) * g / (m * g). Pixels with no valid weight nearby get 0.
 * `den` may be blurMaskWeights of the same mask, made once for several planes.
 */
export function blurGaussianMasked(plane: Float32Array, valid: Uint8Array, width: number, height: number, sigmaPx: number, den = blurMaskWeights(valid, width, height, sigmaPx)): Float32Array {
  const weighted = new Float32Array(plane.length);
  for (let i = 0; i < plane.length; i++) if (valid[i]) weighted[i] = plane[i];
  // Blurred in place: the same numbers as into a copy, without the copy.
  const num = blurGaussian(weighted, width, height, sigmaPx, weighted);
  for (let i = 0; i < num.length; i++) num[i] = den[i] > 1e-6 ? num[i] / den[i] : 0;
  return num;
}

/** dilateMask by the 3 x 3 square: each row ORed with its two neighbours, then each row with the rows above and below. Every pixel of tmp and out is written. */
function dilateByOne(mask: Uint8Array, width: number, height: number, tmp: Uint8Array, out: Uint8Array): Uint8Array {
  if (width % 4 === 0 && [mask, tmp, out].every((a) => a.byteOffset % 4 === 0)) return dilateByOneInWords(mask, width, height, tmp, out);
  for (let y = 0; y < height; y++) {
    const o = y * width;
    const end = o + width - 1;
    if (width === 1) {
      tmp[o] = mask[o] ? 1 : 0;
      continue;
    }
    tmp[o] = mask[o] | mask[o + 1] ? 1 : 0;
    for (let i = o + 1; i < end; i++) tmp[i] = mask[i - 1] | mask[i] | mask[i + 1] ? 1 : 0;
    tmp[end] = mask[end - 1] | mask[end] ? 1 : 0;
  }
  for (let y = 0; y < height; y++) {
    const o = y * width;
    const above = y > 0 ? o - width : o;
    const below = y < height - 1 ? o + width : o;
    for (let x = 0; x < width; x++) out[o + x] = tmp[above + x] | tmp[o + x] | tmp[below + x] ? 1 : 0;
  }
  return out;
}

/**
 * dilateByOne four pixels at a time, for rows of a whole number of 32-bit words:
 * a mask's bytes are 0 or 1 (any non-zero byte counts as 1 and is written as 1),
 * so ORing whole words, each shifted by one byte for the left and right
 * neighbours (the next word's first byte, the last word's last, within the row),
 * sets the same bytes as the byte loop. Little- and big-endian alike: a shift by
 * 8 moves each byte to a neighbouring one, and the byte order only decides which.
 */
function dilateByOneInWords(mask: Uint8Array, width: number, height: number, tmp: Uint8Array, out: Uint8Array): Uint8Array {
  const words = (a: Uint8Array) => new Uint32Array(a.buffer, a.byteOffset, a.length >> 2);
  const m = words(mask), t = words(tmp), o = words(out);
  const perRow = width >> 2;
  // Non-zero bytes to 1: OR the bits of each byte down into its lowest one.
  const ones = (w: number) => {
    let x = w | (w >>> 4);
    x |= x >>> 2;
    x |= x >>> 1;
    return x & 0x01010101;
  };
  const little = new Uint8Array(new Uint32Array([1]).buffer)[0] === 1;
  for (let y = 0; y < height; y++) {
    const r = y * perRow;
    let previous = 0;
    let current = ones(m[r]);
    for (let j = 0; j < perRow; j++) {
      const next = j + 1 < perRow ? ones(m[r + j + 1]) : 0;
      t[r + j] = little
        ? current | (current << 8) | (previous >>> 24) | (current >>> 8) | (next << 24)
        : current | (current >>> 8) | (previous << 24) | (current << 8) | (next >>> 24);
      previous = current;
      current = next;
    }
  }
  for (let y = 0; y < height; y++) {
    const r = y * perRow;
    const above = y > 0 ? r - perRow : r;
    const below = y < height - 1 ? r + perRow : r;
    for (let j = 0; j < perRow; j++) o[r + j] = t[above + j] | t[r + j] | t[below + j];
  }
  return out;
}

/**
 * Dilates a 0/1 mask by a square of half-size radiusPx (separable; rows, then columns row by row for sequential memory access).
 * `scratch` (two arrays of the mask's length, e.g. kept between frames) saves fresh allocations; the result is then scratch[1].
 */
export function dilateMask(mask: Uint8Array, width: number, height: number, radiusPx: number, scratch?: [Uint8Array, Uint8Array]): Uint8Array {
  if (radiusPx <= 0) return Uint8Array.from(mask);
  const reuse = scratch !== undefined && scratch[0].length === mask.length && scratch[1].length === mask.length;
  // Distances are whole pixels: a radius from 1 to under 2 is the 3 x 3 square, by far the commonest.
  if (radiusPx < 2 && radiusPx >= 1) return dilateByOne(mask, width, height, reuse ? scratch[0] : new Uint8Array(mask.length), reuse ? scratch[1] : new Uint8Array(mask.length));
  const tmp = reuse ? scratch[0].fill(0) : new Uint8Array(mask.length);
  for (let y = 0; y < height; y++) {
    const o = y * width;
    let lastSet = -Infinity;
    // Forward: distance to the last set pixel on the left; backward handles the right.
    for (let x = 0; x < width; x++) {
      if (mask[o + x]) lastSet = x;
      if (x - lastSet <= radiusPx) tmp[o + x] = 1;
    }
    let nextSet = Infinity;
    for (let x = width - 1; x >= 0; x--) {
      if (mask[o + x]) nextSet = x;
      if (nextSet - x <= radiusPx) tmp[o + x] = 1;
    }
  }
  const out = reuse ? scratch[1].fill(0) : new Uint8Array(mask.length);
  const last = new Float64Array(width).fill(-Infinity);
  for (let y = 0; y < height; y++) {
    const o = y * width;
    for (let x = 0; x < width; x++) {
      if (tmp[o + x]) last[x] = y;
      if (y - last[x] <= radiusPx) out[o + x] = 1;
    }
  }
  last.fill(Infinity);
  for (let y = height - 1; y >= 0; y--) {
    const o = y * width;
    for (let x = 0; x < width; x++) {
      if (tmp[o + x]) last[x] = y;
      if (last[x] - y <= radiusPx) out[o + x] = 1;
    }
  }
  return out;
}
