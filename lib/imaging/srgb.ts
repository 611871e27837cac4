// sRGB transfer functions, IEC 61966-2-1:1999, section 5.2 (encode) and 5.3 (decode).
import { advanceMulberry32, mixMulberry32, type Rng } from "./random";

const SRGB_LINEAR_LIMIT = 0.0031308;
const SRGB_CODE_LIMIT = 0.04045;

/** Linear light L in 0..1 to encoded V: V = 12.92 L for L <= 0.0031308, else 1.055 L^(1/2.4) - 0.055. */
export function encodeSrgb(linear: number): number {
  if (linear <= 0) return 0;
  if (linear >= 1) return 1;
  return linear <= SRGB_LINEAR_LIMIT ? 12.92 * linear : 1.055 * Math.pow(linear, 1 / 2.4) - 0.055;
}

/** Encoded V in 0..1 to linear L: L = V / 12.92 for V <= 0.04045, else ((V + 0.055) / 1.055)^2.4. */
export function decodeSrgb(encoded: number): number {
  if (encoded <= 0) return 0;
  if (encoded >= 1) return 1;
  return encoded <= SRGB_CODE_LIMIT ? encoded / 12.92 : Math.pow((encoded + 0.055) / 1.055, 2.4);
}

/** Relative luminance of linear sRGB primaries (ITU-R BT.709 / IEC 61966-2-1): Y = 0.2126 R + 0.7152 G + 0.0722 B. */
export function computeLuminance(red: number, green: number, blue: number): number {
  return 0.2126 * red + 0.7152 * green + 0.0722 * blue;
}

/** Luminance plane of 1 or 3 linear planes (a single plane is returned as a copy), into `out` when given (as long as a plane). */
export function computeLuminancePlane(planes: Float32Array[], out: Float32Array = new Float32Array(planes[0]?.length ?? 0)): Float32Array {
  if (planes.length !== 1 && planes.length !== 3) throw new RangeError(`luminance needs 1 or 3 planes, got ${planes.length}`);
  if (out.length !== planes[0].length) throw new RangeError(`the luminance's buffer has ${out.length} values, the planes ${planes[0].length}`);
  if (planes.length === 1) {
    out.set(planes[0]);
    return out;
  }
  const [r, g, b] = planes;
  for (let i = 0; i < out.length; i++) out[i] = 0.2126 * r[i] + 0.7152 * g[i] + 0.0722 * b[i];
  return out;
}

/** A 256-entry table from 8-bit code to linear light, decode(code / 255). */
export function createSrgbDecodeTable(): Float64Array {
  const table = new Float64Array(256);
  for (let code = 0; code < 256; code++) table[code] = decodeSrgb(code / 255);
  return table;
}

/** Points of the transfer-function tables, less one (the step h = 1 / TABLE_SIZE). */
const TABLE_SIZE = 65536;
const tables = new Map<(x: number) => number, Float64Array>();

/**
 * `curve` on 0..1 tabulated at TABLE_SIZE + 1 points and interpolated linearly
 * (0 at and below 0, 1 at and above 1); the interval holding `exactAt`, when
 * given, is computed with the curve itself.
 */
function tabulateCurve(curve: (x: number) => number, exactAt?: number): (x: number) => number {
  let table = tables.get(curve);
  if (!table) {
    table = Float64Array.from({ length: TABLE_SIZE + 1 }, (_, k) => curve(k / TABLE_SIZE));
    tables.set(curve, table);
  }
  const values = table;
  const exactInterval = exactAt === undefined ? -1 : Math.floor(exactAt * TABLE_SIZE);
  return (x: number) => {
    if (!(x > 0)) return 0;
    if (x >= 1) return 1;
    const u = x * TABLE_SIZE;
    const k = u | 0;
    if (k === exactInterval) return curve(x);
    return values[k] + (u - k) * (values[k + 1] - values[k]);
  };
}

/**
 * A fast sRGB encoder: the curve tabulated at 65 537 points and interpolated
 * linearly. The error is at most |V''| h^2 / 8, about 1e-7 near the knee
 * (L = 0.0031308, h = 1 / 65536), below a 16-bit code; in the one interval that
 * holds the knee, where the curve's slope jumps from 12.92 to 12.70, up to
 * h |12.92 - 12.70| / 4 = 8e-7, unless `exactKnee` has that interval encoded exactly.
 */
export function createSrgbEncoder(options: { exactKnee?: boolean } = {}): (linear: number) => number {
  return tabulateCurve(encodeSrgb, options.exactKnee ? SRGB_LINEAR_LIMIT : undefined);
}

/**
 * A fast sRGB decoder: decodeSrgb tabulated at 65 537 points of the code and
 * interpolated linearly. Above the knee the error is at most |L''| h^2 / 8 with
 * L'' <= 3.0 (at V = 1) and h = 1 / 65536, so under 1e-10 of light, below half a
 * float32 step at the knee's light; the interval holding the knee (V = 0.04045),
 * where the curve bends, is decoded exactly.
 */
export function createSrgbDecoder(): (encoded: number) => number {
  return tabulateCurve(decodeSrgb, SRGB_CODE_LIMIT);
}

/** Encode a linear plane (0..1) to sRGB values (0..1) in a new plane. */
export function encodeSrgbPlane(linear: Float32Array): Float32Array {
  const out = new Float32Array(linear.length);
  const encode = createSrgbEncoder();
  for (let i = 0; i < out.length; i++) out[i] = encode(linear[i]);
  return out;
}

/** Decode an sRGB plane (0..1) to linear light in a new plane. */
export function decodeSrgbPlane(encoded: Float32Array): Float32Array {
  const out = new Float32Array(encoded.length);
  for (let i = 0; i < out.length; i++) out[i] = decodeSrgb(encoded[i]);
  return out;
}

/**
 * ditherToUint8 of one plane with createRng's generator kept in `state` (a seed,
 * or the state a previous plane left), written into out[offset + i stride]:
 * the same codes, without a closure call per draw or a plane to interleave.
 * Returns the state after the plane's draws.
 */
export function ditherPlaneInto(values: Float32Array, state: number, out: Uint8Array, offset = 0, stride = 1): number {
  let s = state >>> 0;
  for (let i = 0, o = offset; i < values.length; i++, o += stride) {
    s = advanceMulberry32(s);
    const u1 = mixMulberry32(s);
    s = advanceMulberry32(s);
    const u2 = mixMulberry32(s);
    const v = values[i];
    const q = Math.round(255 * (v > 0 ? (v < 1 ? v : 1) : 0) + u1 - u2);
    out[o] = q < 0 ? 0 : q > 255 ? 255 : q;
  }
  return s;
}

/**
 * Quantize display values in 0..1 to 8-bit codes with triangular (TPDF) dither of
 * one code peak: q = round(255 v + u1 - u2), u uniform. TPDF dither makes the
 * quantization error's mean and variance independent of the signal (Lipshitz,
 * Wannamaker and Vanderkooy 1992, J. Audio Eng. Soc. 40:355), so smooth coronal
 * gradients do not band.
 */
export function ditherToUint8(values: Float32Array, rng: Rng): Uint8Array {
  const out = new Uint8Array(values.length);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    const q = Math.round(255 * (v > 0 ? (v < 1 ? v : 1) : 0) + rng() - rng());
    out[i] = q < 0 ? 0 : q > 255 ? 255 : q;
  }
  return out;
}
