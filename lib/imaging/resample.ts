// Sub-pixel warps of planes under a similarity transform. The map goes from
// output (master) pixels to source (frame) pixels, so every output pixel is
// sampled once.
import type { AffineSimilarity } from "./similarity";

export type ResampleKernel = "bicubic" | "bilinear";

export interface WarpWindow {
  /** Output size. */
  width: number;
  height: number;
  /** Master coordinates of output pixel (0, 0) and the master step per output pixel. */
  originX?: number;
  originY?: number;
  step?: number;
}

/**
 * Keys (1981), "Cubic convolution interpolation for digital image processing",
 * IEEE Trans. ASSP 29:1153, with a = -0.5:
 *   W(s) = (a + 2)|s|^3 - (a + 3)|s|^2 + 1 for |s| <= 1,
 *          a|s|^3 - 5a|s|^2 + 8a|s| - 4a   for 1 < |s| < 2.
 * Writes the weights of the samples at offsets -1, 0, 1, 2 from floor(x).
 */
function computeKeysWeights(t: number, out: Float64Array, offset: number): void {
  const a = -0.5;
  const s1 = t + 1, s2 = t, s3 = 1 - t, s4 = 2 - t;
  out[offset] = ((a * s1 - 5 * a) * s1 + 8 * a) * s1 - 4 * a;
  out[offset + 1] = ((a + 2) * s2 - (a + 3)) * s2 * s2 + 1;
  out[offset + 2] = ((a + 2) * s3 - (a + 3)) * s3 * s3 + 1;
  out[offset + 3] = ((a * s4 - 5 * a) * s4 + 8 * a) * s4 - 4 * a;
}

/** Output buffers a caller may pass to warpPlanes to reuse memory between frames. */
export interface WarpTarget {
  planes: Float32Array[];
  covered: Uint8Array;
  /** Optional mask buffers of the output's size for callers that also warp masks (see warpFrameForMerge). */
  masks?: Uint8Array[];
}

/**
 * Warps planes: out(u, v) = src(M(origin + step (u, v))), with M the master to
 * frame map. `covered` marks output pixels whose source point lies inside the
 * frame; outside, the output is 0. Edges clamp. Each output pixel's position
 * and weights are found once and serve every colour plane.
 */
export function warpPlanes(
  planes: Float32Array[],
  srcWidth: number,
  srcHeight: number,
  masterToFrame: AffineSimilarity,
  window: WarpWindow,
  kernel: ResampleKernel = "bicubic",
  into?: WarpTarget,
): WarpTarget {
  const { width, height } = window;
  const ox = window.originX ?? 0;
  const oy = window.originY ?? 0;
  const step = window.step ?? 1;
  const out = into?.planes ?? planes.map(() => new Float32Array(width * height));
  const covered = into?.covered ?? new Uint8Array(width * height);
  const { a, b, tx, ty } = masterToFrame;
  const channels = planes.length;
  const maxX = srcWidth - 1;
  const maxY = srcHeight - 1;
  const wx = new Float64Array(4);
  const wy = new Float64Array(4);
  if (kernel === "bicubic") {
    for (let v = 0; v < height; v++) {
      const my = oy + v * step;
      const row = v * width;
      if (channels === 3 || channels === 1) warpBicubicRow(planes, out, covered, row, width, ox, step, my, masterToFrame, srcWidth, maxX, maxY, wx, wy);
      else for (let u = 0; u < width; u++) covered[row + u] = sampleBicubicPixel(planes, out, row + u, srcWidth, maxX, maxY, a * (ox + u * step) - b * my + tx, b * (ox + u * step) + a * my + ty, wx, wy);
    }
    return { planes: out, covered };
  }
  for (let v = 0; v < height; v++) {
    const my = oy + v * step;
    const row = v * width;
    for (let u = 0; u < width; u++) {
      const mx = ox + u * step;
      const sx = a * mx - b * my + tx;
      const sy = b * mx + a * my + ty;
      if (!(sx >= -0.5 && sy >= -0.5 && sx <= maxX + 0.5 && sy <= maxY + 0.5)) {
        covered[row + u] = 0;
        for (let c = 0; c < channels; c++) out[c][row + u] = 0;
        continue;
      }
      covered[row + u] = 1;
      const fx = Math.floor(sx);
      const fy = Math.floor(sy);
      for (let c = 0; c < channels; c++) out[c][row + u] = sampleBilinearClamped(planes[c], srcWidth, maxX, maxY, fx, fy, sx - fx, sy - fy);
    }
  }
  return { planes: out, covered };
}

// The rows of warpPlanes' bicubic warp for one and for three planes: sampleBicubicPixel's
// arithmetic written out (weights in locals, each plane's sum in the same order), so that
// every value is the same bit for bit; a pixel near the frame's edge goes through
// sampleBicubicPixel itself. About a fifth less time than calling it per pixel; kept as two
// written-out functions, since one shared row with a shared 4 x 4 sum measured 1.1 to 1.2x slower.

/** Keys weight of the sample at offset -1 (and, with 2 - t, at offset 2) from floor(x): see computeKeysWeights. */
function keysOuter(s: number): number {
  return ((-0.5 * s - 5 * -0.5) * s + 8 * -0.5) * s - 4 * -0.5;
}

/** Keys weight of the samples at offsets 0 and 1 (|s| <= 1): see computeKeysWeights. */
function keysInner(s: number): number {
  return ((-0.5 + 2) * s - (-0.5 + 3)) * s * s + 1;
}

/**
 * One output row of the bicubic warp for one or three planes: interior pixels
 * take the 4 x 4 sum written out per plane (a loop over planes or a call per
 * plane measured 1.6 times slower here), the edge pixels go through sampleBicubicPixel.
 */
function warpBicubicRow(
  planes: Float32Array[], out: Float32Array[], covered: Uint8Array, row: number, width: number, ox: number, step: number, my: number,
  m: AffineSimilarity, srcWidth: number, maxX: number, maxY: number, wx: Float64Array, wy: Float64Array,
): void {
  const { a, b, tx, ty } = m;
  const isColour = planes.length === 3;
  const p0 = planes[0], p1 = planes[isColour ? 1 : 0], p2 = planes[isColour ? 2 : 0];
  const o0 = out[0], o1 = out[isColour ? 1 : 0], o2 = out[isColour ? 2 : 0];
  for (let u = 0; u < width; u++) {
    const o = row + u;
    const sx = a * (ox + u * step) - b * my + tx;
    const sy = b * (ox + u * step) + a * my + ty;
    const fx = Math.floor(sx);
    const fy = Math.floor(sy);
    if (!(sx >= -0.5 && sy >= -0.5 && sx <= maxX + 0.5 && sy <= maxY + 0.5 && fx >= 1 && fy >= 1 && fx + 2 <= maxX && fy + 2 <= maxY)) {
      covered[o] = sampleBicubicPixel(planes, out, o, srcWidth, maxX, maxY, sx, sy, wx, wy);
      continue;
    }
    covered[o] = 1;
    const dx = sx - fx, dy = sy - fy;
    const w0 = keysOuter(dx + 1), w1 = keysInner(dx), w2 = keysInner(1 - dx), w3 = keysOuter(2 - dx);
    const v0 = keysOuter(dy + 1), v1 = keysInner(dy), v2 = keysInner(1 - dy), v3 = keysOuter(2 - dy);
    const r0 = (fy - 1) * srcWidth + fx - 1, r1 = r0 + srcWidth, r2 = r1 + srcWidth, r3 = r2 + srcWidth;
    o0[o] = v0 * (w0 * p0[r0] + w1 * p0[r0 + 1] + w2 * p0[r0 + 2] + w3 * p0[r0 + 3]) + v1 * (w0 * p0[r1] + w1 * p0[r1 + 1] + w2 * p0[r1 + 2] + w3 * p0[r1 + 3])
      + v2 * (w0 * p0[r2] + w1 * p0[r2 + 1] + w2 * p0[r2 + 2] + w3 * p0[r2 + 3]) + v3 * (w0 * p0[r3] + w1 * p0[r3 + 1] + w2 * p0[r3 + 2] + w3 * p0[r3 + 3]);
    if (!isColour) continue;
    o1[o] = v0 * (w0 * p1[r0] + w1 * p1[r0 + 1] + w2 * p1[r0 + 2] + w3 * p1[r0 + 3]) + v1 * (w0 * p1[r1] + w1 * p1[r1 + 1] + w2 * p1[r1 + 2] + w3 * p1[r1 + 3])
      + v2 * (w0 * p1[r2] + w1 * p1[r2 + 1] + w2 * p1[r2 + 2] + w3 * p1[r2 + 3]) + v3 * (w0 * p1[r3] + w1 * p1[r3 + 1] + w2 * p1[r3 + 2] + w3 * p1[r3 + 3]);
    o2[o] = v0 * (w0 * p2[r0] + w1 * p2[r0 + 1] + w2 * p2[r0 + 2] + w3 * p2[r0 + 3]) + v1 * (w0 * p2[r1] + w1 * p2[r1 + 1] + w2 * p2[r1 + 2] + w3 * p2[r1 + 3])
      + v2 * (w0 * p2[r2] + w1 * p2[r2 + 1] + w2 * p2[r2 + 2] + w3 * p2[r2 + 3]) + v3 * (w0 * p2[r3] + w1 * p2[r3 + 1] + w2 * p2[r3 + 2] + w3 * p2[r3 + 3]);
  }
}

/**
 * One output pixel of the bicubic warp, every plane: the source point (sx, sy),
 * Keys weights for its 4 x 4 neighbourhood, then each plane's weighted sum (rows
 * first, in the order warpPlanes always used), written to out[c][o]. Returns 1
 * where the point lies inside the frame (up to half a pixel beyond its edge
 * pixels), else 0 with every plane 0. `wx` and `wy` are scratch of 4.
 */
function sampleBicubicPixel(
  planes: Float32Array[], out: Float32Array[], o: number, srcWidth: number, maxX: number, maxY: number,
  sx: number, sy: number, wx: Float64Array, wy: Float64Array,
): number {
  const channels = planes.length;
  if (!(sx >= -0.5 && sy >= -0.5 && sx <= maxX + 0.5 && sy <= maxY + 0.5)) {
    for (let c = 0; c < channels; c++) out[c][o] = 0;
    return 0;
  }
  const fx = Math.floor(sx);
  const fy = Math.floor(sy);
  computeKeysWeights(sx - fx, wx, 0);
  computeKeysWeights(sy - fy, wy, 0);
  if (!(fx >= 1 && fy >= 1 && fx + 2 <= maxX && fy + 2 <= maxY)) {
    for (let c = 0; c < channels; c++) out[c][o] = sampleBicubicClamped(planes[c], srcWidth, maxX, maxY, fx, fy, wx, wy);
    return 1;
  }
  const w0 = wx[0], w1 = wx[1], w2 = wx[2], w3 = wx[3];
  const v0 = wy[0], v1 = wy[1], v2 = wy[2], v3 = wy[3];
  const base = (fy - 1) * srcWidth + fx - 1;
  for (let c = 0; c < channels; c++) {
    const p = planes[c];
    let r = base;
    let sum = v0 * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
    r += srcWidth;
    sum += v1 * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
    r += srcWidth;
    sum += v2 * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
    r += srcWidth;
    sum += v3 * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
    out[c][o] = sum;
  }
  return 1;
}

/**
 * The bicubic warp (as warpPlanes) at single master pixels: out[c][j] and
 * covered[j] for master point (xs[j], ys[j]), each value the one warpPlanes
 * gives there, bit for bit.
 */
export function warpPlanesAtPoints(
  planes: Float32Array[],
  srcWidth: number,
  srcHeight: number,
  masterToFrame: AffineSimilarity,
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  out: Float32Array[],
  covered: Uint8Array,
): void {
  const { a, b, tx, ty } = masterToFrame;
  const wx = new Float64Array(4);
  const wy = new Float64Array(4);
  for (let j = 0; j < xs.length; j++) {
    const mx = xs[j], my = ys[j];
    covered[j] = sampleBicubicPixel(planes, out, j, srcWidth, srcWidth - 1, srcHeight - 1, a * mx - b * my + tx, b * mx + a * my + ty, wx, wy);
  }
}

function sampleBilinearClamped(p: Float32Array, srcWidth: number, maxX: number, maxY: number, fx: number, fy: number, dx: number, dy: number): number {
  const x0 = fx < 0 ? 0 : fx > maxX ? maxX : fx;
  const x1 = fx + 1 < 0 ? 0 : fx + 1 > maxX ? maxX : fx + 1;
  const y0 = fy < 0 ? 0 : fy > maxY ? maxY : fy;
  const y1 = fy + 1 < 0 ? 0 : fy + 1 > maxY ? maxY : fy + 1;
  const top = p[y0 * srcWidth + x0] + dx * (p[y0 * srcWidth + x1] - p[y0 * srcWidth + x0]);
  const bottom = p[y1 * srcWidth + x0] + dx * (p[y1 * srcWidth + x1] - p[y1 * srcWidth + x0]);
  return top + dy * (bottom - top);
}

function sampleBicubicClamped(p: Float32Array, srcWidth: number, maxX: number, maxY: number, fx: number, fy: number, wx: Float64Array, wy: Float64Array): number {
  let sum = 0;
  for (let r = 0; r < 4; r++) {
    const yy = fy - 1 + r;
    const row = (yy < 0 ? 0 : yy > maxY ? maxY : yy) * srcWidth;
    let line = 0;
    for (let k = 0; k < 4; k++) {
      const xx = fx - 1 + k;
      line += wx[k] * p[row + (xx < 0 ? 0 : xx > maxX ? maxX : xx)];
    }
    sum += wy[r] * line;
  }
  return sum;
}

/** Warps a 0/1 mask by nearest neighbour; outside the frame the result is `outside`. */
export function warpMask(
  mask: Uint8Array,
  srcWidth: number,
  srcHeight: number,
  masterToFrame: AffineSimilarity,
  window: WarpWindow,
  outside = 0,
  into?: Uint8Array,
): Uint8Array {
  const { width, height } = window;
  const ox = window.originX ?? 0;
  const oy = window.originY ?? 0;
  const step = window.step ?? 1;
  // Every output pixel is written below, so a reused buffer needs no clearing.
  const out = into?.length === width * height ? into : new Uint8Array(width * height);
  const { a, b, tx, ty } = masterToFrame;
  for (let v = 0; v < height; v++) {
    const my = oy + v * step;
    for (let u = 0; u < width; u++) {
      const mx = ox + u * step;
      const sx = Math.round(a * mx - b * my + tx);
      const sy = Math.round(b * mx + a * my + ty);
      out[v * width + u] = sx >= 0 && sy >= 0 && sx < srcWidth && sy < srcHeight ? mask[sy * srcWidth + sx] : outside;
    }
  }
  return out;
}

/**
 * warpMask for several masks of one frame at once (each source position found
 * once): out[m] is masks[m] warped, outside[m] beyond the frame; into[m], when of
 * the output's size, is reused.
 */
export function warpMasks(
  masks: Uint8Array[],
  srcWidth: number,
  srcHeight: number,
  masterToFrame: AffineSimilarity,
  window: WarpWindow,
  outside: number[],
  into: (Uint8Array | undefined)[] = [],
): Uint8Array[] {
  const { width, height } = window;
  const ox = window.originX ?? 0;
  const oy = window.originY ?? 0;
  const step = window.step ?? 1;
  const count = masks.length;
  // Every output pixel is written below, so a reused buffer needs no clearing.
  const out = masks.map((_, m) => (into[m]?.length === width * height ? into[m]! : new Uint8Array(width * height)));
  const { a, b, tx, ty } = masterToFrame;
  for (let v = 0; v < height; v++) {
    const my = oy + v * step;
    const row = v * width;
    for (let u = 0; u < width; u++) {
      const mx = ox + u * step;
      const sx = Math.round(a * mx - b * my + tx);
      const sy = Math.round(b * mx + a * my + ty);
      if (sx >= 0 && sy >= 0 && sx < srcWidth && sy < srcHeight) {
        const at = sy * srcWidth + sx;
        for (let m = 0; m < count; m++) out[m][row + u] = masks[m][at];
      } else {
        for (let m = 0; m < count; m++) out[m][row + u] = outside[m];
      }
    }
  }
  return out;
}

/** warpMasks at single master points (xs[j], ys[j]): out[m][j], bit for bit what warpMask gives there. */
export function warpMasksAtPoints(
  masks: Uint8Array[],
  srcWidth: number,
  srcHeight: number,
  masterToFrame: AffineSimilarity,
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  outside: number[],
  out: Uint8Array[],
): void {
  const { a, b, tx, ty } = masterToFrame;
  for (let j = 0; j < xs.length; j++) {
    const mx = xs[j], my = ys[j];
    const sx = Math.round(a * mx - b * my + tx);
    const sy = Math.round(b * mx + a * my + ty);
    const inside = sx >= 0 && sy >= 0 && sx < srcWidth && sy < srcHeight;
    for (let m = 0; m < masks.length; m++) out[m][j] = inside ? masks[m][sy * srcWidth + sx] : outside[m];
  }
}
