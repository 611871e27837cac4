// Zoom pyramids reduced in linear light: averaging encoded sRGB values darkens
// faint detail (the mean of codes is below the code of the mean light), so faint
// streamers and stars fade at zoomed-out levels. We decode, average 2 x 2 pixels,
// and encode again (IEC 61966-2-1 both ways).
import { ImagingError } from "./errors";
import { createSrgbDecoder, createSrgbEncoder, decodeSrgb, encodeSrgb } from "./srgb";
import type { PlaneImage } from "./types";

/**
 * Halves an sRGB-encoded image (0..1) in linear light; odd edges average the
 * pixels they hold. Decoded and encoded through tables (createSrgbDecoder,
 * createSrgbEncoder, both exact in the interval holding the knee): each value
 * lies within 2e-7 of the halving computed with decodeSrgb and encodeSrgb (the
 * encoder's error from the curve's bend near the knee; elsewhere less), a
 * seventieth of a 16-bit code, at a fraction of the cost of five powers a pixel.
 */
export function halveImageLinear(image: PlaneImage): PlaneImage {
  const { width, height } = image;
  if (width < 1 || height < 1) throw new ImagingError("bad-parameter", `cannot halve a ${width} x ${height} image`);
  const w = Math.ceil(width / 2);
  const h = Math.ceil(height / 2);
  const decode = createSrgbDecoder();
  const encode = createSrgbEncoder({ exactKnee: true });
  // Whole 2 x 2 cells first; an odd last column or row averages what it holds.
  const wholeW = width >> 1;
  const planes = image.planes.map((src) => {
    const out = new Float32Array(w * h);
    for (let y = 0; y < h; y++) {
      const r0 = 2 * y * width;
      const hasRow1 = 2 * y + 1 < height;
      const r1 = hasRow1 ? r0 + width : r0;
      const o = y * w;
      if (hasRow1) {
        for (let x = 0; x < wholeW; x++) {
          const a = r0 + 2 * x, b = r1 + 2 * x;
          out[o + x] = encode((decode(src[a]) + decode(src[a + 1]) + decode(src[b]) + decode(src[b + 1])) / 4);
        }
      } else {
        for (let x = 0; x < wholeW; x++) out[o + x] = encode((decode(src[r0 + 2 * x]) + decode(src[r0 + 2 * x + 1])) / 2);
      }
      if (wholeW < w) {
        const x0 = width - 1;
        out[o + wholeW] = hasRow1 ? encode((decode(src[r0 + x0]) + decode(src[r1 + x0])) / 2) : encode(decode(src[r0 + x0]));
      }
    }
    return out;
  });
  return { width: w, height: h, planes };
}

/** Level sizes as Deep Zoom counts them: level L of maxLevel = ceil(log2(max(W, H))) is ceil(W / 2^(maxLevel - L)) wide. */
export function computePyramidLevelSizes(width: number, height: number): { level: number; width: number; height: number }[] {
  if (!(Number.isInteger(width) && Number.isInteger(height) && width > 0 && height > 0)) {
    throw new ImagingError("bad-parameter", `pyramid size must be positive integers, got ${width} x ${height}`);
  }
  const maxLevel = Math.ceil(Math.log2(Math.max(width, height)));
  const out = [];
  for (let level = 0; level <= maxLevel; level++) {
    const f = 2 ** (maxLevel - level);
    out.push({ level, width: Math.ceil(width / f), height: Math.ceil(height / f) });
  }
  return out;
}

/** All levels from full size (index 0) down to 1 x 1, each halved in linear light from the one above. */
export function buildPyramid(image: PlaneImage): PlaneImage[] {
  const levels = [image];
  let current = image;
  while (current.width > 1 || current.height > 1) {
    current = halveImageLinear(current);
    levels.push(current);
  }
  return levels;
}

/** Size of an image scaled so its long side is at most longSidePx (never enlarged); 0 keeps the size. */
export function computeScaledSize(width: number, height: number, longSidePx: number): { width: number; height: number; scale: number } {
  if (!(Number.isInteger(longSidePx) && longSidePx >= 0)) throw new ImagingError("bad-parameter", `longSidePx must be a whole number >= 0, got ${longSidePx}`);
  const long = Math.max(width, height);
  if (longSidePx === 0 || long <= longSidePx) return { width, height, scale: 1 };
  const scale = longSidePx / long;
  return { width: Math.max(1, Math.round(width * scale)), height: Math.max(1, Math.round(height * scale)), scale };
}

/** For each output index, the source pixels it covers and the share of each (area weights summing to 1). */
function buildAreaWeights(from: number, to: number): { start: number; weights: number[] }[] {
  const step = from / to;
  return Array.from({ length: to }, (_, o) => {
    const a = o * step;
    const b = Math.min(from, (o + 1) * step);
    const start = Math.floor(a);
    const weights: number[] = [];
    for (let j = start; j < b; j++) weights.push((Math.min(b, j + 1) - Math.max(a, j)) / (b - a));
    return { start, weights };
  });
}

/**
 * An sRGB-encoded image (0..1) scaled down to exactly width x height in linear
 * light: halved (halveImageLinear, or the caller's shared halving) while still
 * at least twice the target, then area-averaged (each output pixel the mean
 * light of the source area it covers). Never enlarges.
 */
export function scaleImageLinear(image: PlaneImage, width: number, height: number, halve: (image: PlaneImage) => PlaneImage = halveImageLinear): PlaneImage {
  if (!(Number.isInteger(width) && Number.isInteger(height) && width >= 1 && height >= 1)) throw new ImagingError("bad-parameter", `target size must be positive integers, got ${width} x ${height}`);
  if (width > image.width || height > image.height) throw new ImagingError("bad-parameter", `cannot enlarge ${image.width} x ${image.height} to ${width} x ${height}`);
  let level = image;
  while (level.width >= 2 * width && level.height >= 2 * height) level = halve(level);
  if (level.width === width && level.height === height) return level;
  const wx = buildAreaWeights(level.width, width);
  const wy = buildAreaWeights(level.height, height);
  const planes = level.planes.map((src) => {
    const rows = new Float32Array(width * level.height);
    for (let y = 0; y < level.height; y++) {
      for (let x = 0; x < width; x++) {
        const { start, weights } = wx[x];
        let sum = 0;
        for (let k = 0; k < weights.length; k++) sum += weights[k] * decodeSrgb(src[y * level.width + start + k]);
        rows[y * width + x] = sum;
      }
    }
    const out = new Float32Array(width * height);
    for (let y = 0; y < height; y++) {
      const { start, weights } = wy[y];
      for (let x = 0; x < width; x++) {
        let sum = 0;
        for (let k = 0; k < weights.length; k++) sum += weights[k] * rows[(start + k) * width + x];
        out[y * width + x] = encodeSrgb(sum);
      }
    }
    return out;
  });
  return { width, height, planes };
}
