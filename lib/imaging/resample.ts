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

/**
 * Warps planes: out(u, v) = src(M(origin + step (u, v))), with M the master to
 * frame map. `covered` marks output pixels whose source point lies inside the
 * frame; outside, the output is 0. Edges clamp.
 */
export function warpPlanes(
  planes: Float32Array[],
  srcWidth: number,
  srcHeight: number,
  masterToFrame: AffineSimilarity,
  window: WarpWindow,
  kernel: ResampleKernel = "bicubic",
): { planes: Float32Array[]; covered: Uint8Array } {
  const { width, height } = window;
  const ox = window.originX ?? 0;
  const oy = window.originY ?? 0;
  const step = window.step ?? 1;
  const out = planes.map(() => new Float32Array(width * height));
  const covered = new Uint8Array(width * height);
  const { a, b, tx, ty } = masterToFrame;
  const wx = new Float64Array(4);
  const wy = new Float64Array(4);
  const xi = new Int32Array(4);
  const yi = new Int32Array(4);
  const channels = planes.length;
  const maxX = srcWidth - 1;
  const maxY = srcHeight - 1;
  for (let v = 0; v < height; v++) {
    const my = oy + v * step;
    for (let u = 0; u < width; u++) {
      const mx = ox + u * step;
      const sx = a * mx - b * my + tx;
      const sy = b * mx + a * my + ty;
      if (!(sx >= -0.5 && sy >= -0.5 && sx <= maxX + 0.5 && sy <= maxY + 0.5)) continue;
      const o = v * width + u;
      covered[o] = 1;
      const fx = Math.floor(sx);
      const fy = Math.floor(sy);
      const dx = sx - fx;
      const dy = sy - fy;
      if (kernel === "bilinear") {
        const x0 = fx < 0 ? 0 : fx > maxX ? maxX : fx;
        const x1 = fx + 1 < 0 ? 0 : fx + 1 > maxX ? maxX : fx + 1;
        const y0 = fy < 0 ? 0 : fy > maxY ? maxY : fy;
        const y1 = fy + 1 < 0 ? 0 : fy + 1 > maxY ? maxY : fy + 1;
        for (let c = 0; c < channels; c++) {
          const p = planes[c];
          const top = p[y0 * srcWidth + x0] + dx * (p[y0 * srcWidth + x1] - p[y0 * srcWidth + x0]);
          const bottom = p[y1 * srcWidth + x0] + dx * (p[y1 * srcWidth + x1] - p[y1 * srcWidth + x0]);
          out[c][o] = top + dy * (bottom - top);
        }
        continue;
      }
      computeKeysWeights(dx, wx, 0);
      computeKeysWeights(dy, wy, 0);
      if (fx >= 1 && fy >= 1 && fx + 2 <= maxX && fy + 2 <= maxY) {
        // Interior: no clamping, rows addressed directly.
        const base = (fy - 1) * srcWidth + fx - 1;
        const w0 = wx[0], w1 = wx[1], w2 = wx[2], w3 = wx[3];
        for (let c = 0; c < channels; c++) {
          const p = planes[c];
          let r = base;
          let sum = wy[0] * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
          r += srcWidth;
          sum += wy[1] * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
          r += srcWidth;
          sum += wy[2] * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
          r += srcWidth;
          sum += wy[3] * (w0 * p[r] + w1 * p[r + 1] + w2 * p[r + 2] + w3 * p[r + 3]);
          out[c][o] = sum;
        }
        continue;
      }
      for (let k = 0; k < 4; k++) {
        const x = fx - 1 + k;
        const y = fy - 1 + k;
        xi[k] = x < 0 ? 0 : x > maxX ? maxX : x;
        yi[k] = (y < 0 ? 0 : y > maxY ? maxY : y) * srcWidth;
      }
      for (let c = 0; c < channels; c++) {
        const p = planes[c];
        let sum = 0;
        for (let r = 0; r < 4; r++) {
          const row = yi[r];
          sum += wy[r] * (wx[0] * p[row + xi[0]] + wx[1] * p[row + xi[1]] + wx[2] * p[row + xi[2]] + wx[3] * p[row + xi[3]]);
        }
        out[c][o] = sum;
      }
    }
  }
  return { planes: out, covered };
}

/** Warps a 0/1 mask by nearest neighbour; outside the frame the result is `outside`. */
export function warpMask(
  mask: Uint8Array,
  srcWidth: number,
  srcHeight: number,
  masterToFrame: AffineSimilarity,
  window: WarpWindow,
  outside = 0,
): Uint8Array {
  const { width, height } = window;
  const ox = window.originX ?? 0;
  const oy = window.originY ?? 0;
  const step = window.step ?? 1;
  const out = new Uint8Array(width * height);
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
