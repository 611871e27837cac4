// The pixel pairs that frame-levels.ts fits its lines through, taken from the
// registered bracket as block means on a grid of master pixels.
//
// Why block means: a frame's counts are y = o + tau t E, linear in the light E,
// so the mean of a block of master pixels obeys the same line between two frames,
// y_i = alpha y_j + beta, exactly, while its noise falls with the square root of
// the pixels averaged. Every master pixel then counts (one point per block)
// where a sparse grid of single pixels read one in a hundred at 24 megapixels, and
// the regressor's smaller noise leaves less of it to leak across the bins.
// A block counts only when all of it is usable in the frame: inside the frame,
// clear of clipped and defective pixels (each pixel's bilinear neighbours
// included) and of the Moon.
//
// Each frame is read once, into its block means (a few hundred thousand numbers,
// whatever the frame's size); a pair of frames then only compares two such lists.

/** What measureBlockMeans needs of one registered frame. */
export interface LevelSource {
  width: number;
  height: number;
  /** Counts above the current black level (the frame's luminance). */
  luminance: Float32Array;
  /** 1 = clipped (already dilated). */
  excluded: Uint8Array;
  /** 1 = sensor defect; absent when none are known. */
  masked?: Uint8Array;
  masterToFrame: { a: number; b: number; tx: number; ty: number };
  noiseSigma: number;
}

/** Square blocks of master pixels, row by row; the Moon's blocks are never used. */
export interface LevelGrid {
  blockPx: number;
  columns: number;
  rows: number;
  /** Per block, 1 where any of its pixels lies within the Moon's disk (as widened by the caller). */
  isMoon: Uint8Array;
}

/** Blocks on the grid at most: enough points for the binned line fit, few enough to sort at once. */
export const MAX_LEVEL_BLOCKS = 250_000;

/**
 * The grid of blocks over the master (the side chosen so that at most maxBlocks
 * fit; a last partial column or row is left out) and the blocks that touch the
 * Moon (`moon`, master pixels, already widened by the caller).
 */
export function createLevelGrid(masterWidth: number, masterHeight: number, moon: { x: number; y: number; radiusPx: number }, maxBlocks = MAX_LEVEL_BLOCKS): LevelGrid {
  const blockPx = Math.max(1, Math.ceil(Math.sqrt((masterWidth * masterHeight) / maxBlocks)));
  const columns = Math.floor(masterWidth / blockPx);
  const rows = Math.floor(masterHeight / blockPx);
  const isMoon = new Uint8Array(columns * rows);
  const r = moon.radiusPx;
  if (r > 0) {
    // Pixel (x, y) is the Moon's when (x - cx)^2 + (y - cy)^2 < r^2; per row of pixels the Moon is one run of x.
    for (let y = Math.max(0, Math.floor(moon.y - r)); y <= Math.min(rows * blockPx - 1, Math.ceil(moon.y + r)); y++) {
      const half2 = r * r - (y - moon.y) ** 2;
      if (!(half2 > 0)) continue;
      const half = Math.sqrt(half2);
      // Smallest and largest integer x strictly inside the disk.
      const x0 = Math.max(0, Math.floor(moon.x - half) + 1);
      const x1 = Math.min(columns * blockPx - 1, Math.ceil(moon.x + half) - 1);
      if (x1 < x0) continue;
      const row = Math.floor(y / blockPx) * columns;
      for (let c = Math.floor(x0 / blockPx); c <= Math.floor(x1 / blockPx); c++) isMoon[row + c] = 1;
    }
  }
  return { blockPx, columns, rows, isMoon };
}

/**
 * One frame's mean count over each block of the grid (bilinear samples at every
 * master pixel of the block), NaN for a block not wholly usable (see the notes at
 * the top of this file). A frame without its pixels (left out by the
 * registration) has no usable block.
 */
export function measureBlockMeans(source: LevelSource | undefined, grid: LevelGrid): Float32Array {
  const { blockPx: s, columns, rows, isMoon } = grid;
  const means = new Float32Array(columns * rows).fill(NaN);
  if (!source) return means;
  // Pixel data read once: a source's fields may be getters that fetch a whole frame from disk.
  const { width, height } = source;
  const lum = source.luminance;
  const clipped = source.excluded;
  const masked = source.masked;
  if (lum.length < width * height || clipped.length < width * height) return means;
  // Without a defect map, the clipped one stands in for it (the same test twice, and no branch per pixel).
  const defects = masked && masked.length >= width * height ? masked : clipped;
  const { a, b, tx, ty } = source.masterToFrame;
  const area = s * s;
  for (let by = 0; by < rows; by++) {
    const my0 = by * s;
    for (let bx = 0; bx < columns; bx++) {
      if (isMoon[by * columns + bx]) continue;
      const mx0 = bx * s;
      // Frame position of master pixel (mx, my): x = a mx - b my + tx, y = b mx + a my + ty. The map
      // is affine, so the footprint's extremes are at the block's corners: (mx0, my0) plus 0 or s - 1
      // along master x, which moves the frame position by (a, b) (s - 1), and along master y, by (-b, a) (s - 1).
      const x00 = a * mx0 - b * my0 + tx;
      const y00 = b * mx0 + a * my0 + ty;
      const as = a * (s - 1);
      const bs = b * (s - 1);
      const minX = x00 + Math.min(0, as) + Math.min(0, -bs);
      const maxX = x00 + Math.max(0, as) + Math.max(0, -bs);
      const minY = y00 + Math.min(0, bs) + Math.min(0, as);
      const maxY = y00 + Math.max(0, bs) + Math.max(0, as);
      // Every bilinear sample needs pixels floor(x) .. floor(x) + 1 (and so in y) inside the frame.
      if (!(minX >= 0 && minY >= 0)) continue;
      const fx0 = Math.floor(minX);
      const fy0 = Math.floor(minY);
      const fx1 = Math.floor(maxX) + 1;
      const fy1 = Math.floor(maxY) + 1;
      if (!(fx1 < width && fy1 < height)) continue;
      // Clear of clipped and defective pixels: every pixel any sample reads lies in this box.
      let isClear = true;
      for (let v = fy0; v <= fy1 && isClear; v++) {
        for (let k = v * width + fx0, end = v * width + fx1; k <= end; k++) {
          if (clipped[k] | defects[k]) { isClear = false; break; }
        }
      }
      if (!isClear) continue;
      let sum = 0;
      for (let my = my0; my < my0 + s; my++) {
        const rowX = -b * my + tx;
        const rowY = a * my + ty;
        for (let mx = mx0; mx < mx0 + s; mx++) {
          const x = a * mx + rowX;
          const y = b * mx + rowY;
          // x, y >= 0 here: truncation is floor.
          const x0 = x | 0;
          const y0 = y | 0;
          const k = y0 * width + x0;
          const k2 = k + width;
          const fx = x - x0;
          const top = lum[k] + fx * (lum[k + 1] - lum[k]);
          const bottom = lum[k2] + fx * (lum[k2 + 1] - lum[k2]);
          sum += top + (y - y0) * (bottom - top);
        }
      }
      const mean = sum / area;
      if (Number.isFinite(mean)) means[by * columns + bx] = mean;
    }
  }
  return means;
}

export interface PairSamples {
  /** Index of the shorter (or dimmer) frame: y_i. */
  i: number;
  /** Index of the longer frame: y_j, the regressor (its higher signal-to-noise keeps binning unbiased). */
  j: number;
  /** Counts above the current black level over the same master blocks. */
  yi: Float32Array;
  yj: Float32Array;
}

/**
 * The blocks both frames measured, where frame j's counts stand well above its
 * dark noise (floorJ, in its counts): the points fitPairLine bins.
 */
export function collectPairSamples(i: number, meansI: Float32Array, j: number, meansJ: Float32Array, floorJ: number): PairSamples {
  let n = 0;
  for (let k = 0; k < meansI.length; k++) if (meansJ[k] > floorJ && meansI[k] === meansI[k]) n++;
  const yi = new Float32Array(n);
  const yj = new Float32Array(n);
  n = 0;
  for (let k = 0; k < meansI.length; k++) {
    if (meansJ[k] > floorJ && meansI[k] === meansI[k]) {
      yi[n] = meansI[k];
      yj[n] = meansJ[k];
      n++;
    }
  }
  return { i, j, yi, yj };
}

/**
 * Indices 0 .. n - 1 in ascending order of values[index], ties in index order
 * (the order a stable comparison sort gives), by a least-significant-digit radix
 * sort on the floats' bit patterns in three passes of 11 bits: linear in n where
 * a comparison sort with a callback was the measurement's largest cost. NaN
 * sorts last.
 */
export function sortIndicesByValue(values: Float32Array): Uint32Array {
  const n = values.length;
  const bits = new Uint32Array(Float32Array.from(values).buffer);
  // Map IEEE 754 bits to unsigned integers in the floats' order: flip all bits of negatives, the sign bit of the rest.
  for (let k = 0; k < n; k++) {
    const v = bits[k];
    bits[k] = v & 0x80000000 ? ~v >>> 0 : (v | 0x80000000) >>> 0;
  }
  let order = new Uint32Array(n);
  let spare = new Uint32Array(n);
  for (let k = 0; k < n; k++) order[k] = k;
  const counts = new Uint32Array(2048);
  for (const shift of [0, 11, 22]) {
    counts.fill(0);
    for (let k = 0; k < n; k++) counts[(bits[k] >>> shift) & 2047]++;
    let total = 0;
    for (let d = 0; d < 2048; d++) {
      const c = counts[d];
      counts[d] = total;
      total += c;
    }
    for (let k = 0; k < n; k++) {
      const idx = order[k];
      spare[counts[(bits[idx] >>> shift) & 2047]++] = idx;
    }
    [order, spare] = [spare, order];
  }
  return order;
}
