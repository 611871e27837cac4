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
 * frame; outside, the output is 0. Edges clamp. Bicubic rows are done in two
 * passes (positions and weights once, then each plane in a tight loop), since
 * the weights serve every colour plane.
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
  // Per-row scratch: 0 outside, 1 interior (no clamping), 2 near an edge.
  const kind = new Uint8Array(width);
  const base = new Int32Array(width);
  const fxs = new Int32Array(width);
  const fys = new Int32Array(width);
  const weights = new Float64Array(width * 8);
  const wx = new Float64Array(4);
  const wy = new Float64Array(4);
  for (let v = 0; v < height; v++) {
    const my = oy + v * step;
    const row = v * width;
    for (let u = 0; u < width; u++) {
      const mx = ox + u * step;
      const sx = a * mx - b * my + tx;
      const sy = b * mx + a * my + ty;
      if (!(sx >= -0.5 && sy >= -0.5 && sx <= maxX + 0.5 && sy <= maxY + 0.5)) {
        kind[u] = 0;
        covered[row + u] = 0;
        continue;
      }
      covered[row + u] = 1;
      const fx = Math.floor(sx);
      const fy = Math.floor(sy);
      fxs[u] = fx;
      fys[u] = fy;
      if (kernel === "bilinear") {
        weights[u * 8] = sx - fx;
        weights[u * 8 + 1] = sy - fy;
        kind[u] = 2;
        continue;
      }
      computeKeysWeights(sx - fx, weights, u * 8);
      computeKeysWeights(sy - fy, weights, u * 8 + 4);
      if (fx >= 1 && fy >= 1 && fx + 2 <= maxX && fy + 2 <= maxY) {
        kind[u] = 1;
        base[u] = (fy - 1) * srcWidth + fx - 1;
      } else kind[u] = 2;
    }
    for (let c = 0; c < channels; c++) {
      const p = planes[c];
      const o = out[c];
      for (let u = 0; u < width; u++) {
        const k = kind[u];
        if (k === 1) {
          const w = u * 8;
          const w0 = weights[w], w1 = weights[w + 1], w2 = weights[w + 2], w3 = weights[w + 3];
          let r = base[u];
          let sum = weights[w + 4] * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
          r += srcWidth;
          sum += weights[w + 5] * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
          r += srcWidth;
          sum += weights[w + 6] * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
          r += srcWidth;
          sum += weights[w + 7] * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
          o[row + u] = sum;
        } else if (k === 0) {
          o[row + u] = 0;
        } else if (kernel === "bilinear") {
          o[row + u] = sampleBilinearClamped(p, srcWidth, maxX, maxY, fxs[u], fys[u], weights[u * 8], weights[u * 8 + 1]);
        } else {
          for (let t = 0; t < 4; t++) {
            wx[t] = weights[u * 8 + t];
            wy[t] = weights[u * 8 + 4 + t];
          }
          o[row + u] = sampleBicubicClamped(p, srcWidth, maxX, maxY, fxs[u], fys[u], wx, wy);
        }
      }
    }
  }
  return { planes: out, covered };
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
