// Coarse lunar disk: the dark, round region that bright corona surrounds.
// Threshold a downsampled copy at several levels, label dark regions that do not
// touch the border, and keep the roundest one.

import { findKthSmallest } from "./select";

export interface CoarseDisk {
  x: number;
  y: number;
  radiusPx: number;
}

const COARSE_MAX_SIDE = 384;
const THRESHOLD_FRACTIONS = [0.5, 0.3, 0.18, 0.1, 0.05, 0.025, 0.012];

/** Box-mean downsampling by an integer factor (partial edge cells averaged over what they hold). */
export function downsampleMean(plane: Float32Array, width: number, height: number, factor: number): { data: Float32Array; width: number; height: number } {
  const w = Math.ceil(width / factor);
  const h = Math.ceil(height / factor);
  return { data: averageBoxes(plane, width, height, factor, new Float32Array(w * h)), width: w, height: h };
}

/**
 * Means of factor x factor boxes (partial at the right and bottom edges) into
 * `out` (ceil(width / factor) x ceil(height / factor)), each box's sum adding its
 * pixels in the order of a row-major walk: the numbers of the plain per-pixel loop
 * (downsampleMeanOf's), without a call or a division per pixel.
 */
export function averageBoxes<T extends Float32Array | Float64Array>(plane: Float32Array, width: number, height: number, factor: number, out: T): T {
  const w = Math.ceil(width / factor);
  const h = Math.ceil(height / factor);
  const sums = new Float64Array(w * h);
  for (let y = 0; y < height; y++) {
    const row = ((y / factor) | 0) * w;
    const o = y * width;
    for (let j = 0, x = 0; j < w; j++) {
      const end = Math.min(width, x + factor);
      let s = sums[row + j];
      for (; x < end; x++) s += plane[o + x];
      sums[row + j] = s;
    }
  }
  for (let k = 0; k < h; k++) {
    const rows = Math.min(factor, height - k * factor);
    for (let j = 0; j < w; j++) out[k * w + j] = sums[k * w + j] / (rows * Math.min(factor, width - j * factor));
  }
  return out;
}

/** The same, of any per-pixel value (e.g. a luminance computed on the fly, never stored at full size). */
export function downsampleMeanOf(width: number, height: number, factor: number, valueAt: (index: number) => number): { data: Float32Array; width: number; height: number } {
  const w = Math.ceil(width / factor);
  const h = Math.ceil(height / factor);
  const sum = new Float64Array(w * h);
  const count = new Uint32Array(w * h);
  for (let y = 0; y < height; y++) {
    const row = ((y / factor) | 0) * w;
    for (let x = 0; x < width; x++) {
      const j = row + ((x / factor) | 0);
      sum[j] += valueAt(y * width + x);
      count[j]++;
    }
  }
  const data = new Float32Array(w * h);
  for (let j = 0; j < data.length; j++) data[j] = sum[j] / count[j];
  return { data, width: w, height: h };
}

/** Finds the coarse disk, or null when no enclosed round dark region exists. */
export function findCoarseDisk(plane: Float32Array, width: number, height: number): CoarseDisk | null {
  const factor = Math.max(1, Math.ceil(Math.max(width, height) / COARSE_MAX_SIDE));
  const ds = downsampleMean(plane, width, height, factor);
  const values = Float32Array.from(ds.data);
  const lo = findKthSmallest(values, Math.floor(values.length * 0.01)) as number;
  const hi = findKthSmallest(values, Math.floor(values.length * 0.995)) as number;
  if (!(hi > lo)) return null;
  const labels = new Int32Array(ds.data.length);
  const stack = new Int32Array(ds.data.length);
  let best: { disk: CoarseDisk; score: number } | null = null;
  for (const fraction of THRESHOLD_FRACTIONS) {
    const threshold = lo + fraction * (hi - lo);
    labels.fill(0);
    let label = 0;
    for (let start = 0; start < ds.data.length; start++) {
      if (labels[start] !== 0 || ds.data[start] >= threshold) continue;
      label++;
      let top = 0;
      stack[top++] = start;
      labels[start] = label;
      let area = 0, sx = 0, sy = 0, touches = false;
      let minX = Infinity, maxX = -Infinity, minY = Infinity, maxY = -Infinity;
      while (top > 0) {
        const i = stack[--top];
        const x = i % ds.width;
        const y = (i / ds.width) | 0;
        area++;
        sx += x;
        sy += y;
        if (x < minX) minX = x;
        if (x > maxX) maxX = x;
        if (y < minY) minY = y;
        if (y > maxY) maxY = y;
        if (x === 0 || y === 0 || x === ds.width - 1 || y === ds.height - 1) touches = true;
        if (x > 0 && labels[i - 1] === 0 && ds.data[i - 1] < threshold) { labels[i - 1] = label; stack[top++] = i - 1; }
        if (x < ds.width - 1 && labels[i + 1] === 0 && ds.data[i + 1] < threshold) { labels[i + 1] = label; stack[top++] = i + 1; }
        if (y > 0 && labels[i - ds.width] === 0 && ds.data[i - ds.width] < threshold) { labels[i - ds.width] = label; stack[top++] = i - ds.width; }
        if (y < ds.height - 1 && labels[i + ds.width] === 0 && ds.data[i + ds.width] < threshold) { labels[i + ds.width] = label; stack[top++] = i + ds.width; }
      }
      if (touches || area < 30) continue;
      const bw = maxX - minX + 1;
      const bh = maxY - minY + 1;
      const aspect = Math.min(bw, bh) / Math.max(bw, bh);
      const fill = area / ((Math.PI * bw * bh) / 4);
      if (aspect < 0.8 || fill < 0.8 || fill > 1.15) continue;
      const score = Math.abs(1 - fill) + (1 - aspect);
      if (!best || score < best.score) {
        const scale = factor;
        best = {
          score,
          disk: {
            // Downsampled pixel j covers full pixels j*f .. j*f + f - 1, centred at j*f + (f - 1)/2.
            x: (sx / area) * scale + (scale - 1) / 2,
            y: (sy / area) * scale + (scale - 1) / 2,
            radiusPx: ((bw + bh) / 4) * scale,
          },
        };
      }
    }
  }
  return best?.disk ?? null;
}
