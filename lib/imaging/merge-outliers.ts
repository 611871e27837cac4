// The second merge pass's outlier record and rejection (see merge.ts): per
// master pixel the frame that disagrees most with the others, kept only where
// it may be taken out, and taken out at the end of the pass.

/** Outliers: a score above this many sigmas of the leave-one-out prediction (after the frame's own z scale is measured). */
export const OUTLIER_SIGMAS = 5;
/** Around an outlier, the worst frame goes at this lower score too, so that a trail's wings below the threshold go with it. */
export const OUTLIER_WING_SIGMAS = 2.5;
/** Outliers grow by this many pixels (the wings' reach). */
const REJECT_GROW_PX = 2;

/**
 * The second pass's record of outliers: per master pixel, the frame with the
 * largest outlier score so far and what it added, so that it can be taken out at
 * the end. Only pixels where that score passes OUTLIER_WING_SIGMAS are listed
 * (removeOutliers takes nothing out at a lower score, and a frame that scores
 * above it always beats one that scored below), in ascending master order, each
 * once, about 27 bytes each. Measured on the synthetic brackets: 23 647 of 24
 * million pixels over 3 frames of 6000 x 4000, 7 219 of 1.5 million over 9 frames
 * of 1500 x 1000, where a record of every pixel took 552 MB at 24 megapixels.
 */
export interface WorstFrameRecord {
  /** Master pixel index, ascending. */
  pixel: Int32Array;
  /** The frame's index in the merge (the order frames were added). */
  frame: Int16Array;
  score: Float32Array;
  /** Its exposure weight (w t) there. */
  weight: Float32Array;
  /** 1 = the frame counted in the pixel's coverage (above its noise floor). */
  wellExposed: Uint8Array;
  /** Per plane, what it added to the sums (w y). */
  contribution: Float32Array[];
}

/** A frame's entries for the worst-frame record while its bands are added: growing arrays, the first `count` in use. */
export interface WorstCandidates {
  count: number;
  pixel: Int32Array;
  score: Float32Array;
  weight: Float32Array;
  wellExposed: Uint8Array;
  contribution: Float32Array[];
}

export function createWorstRecord(channels: number, length = 0): WorstFrameRecord {
  return {
    pixel: new Int32Array(length), frame: new Int16Array(length), score: new Float32Array(length), weight: new Float32Array(length),
    wellExposed: new Uint8Array(length), contribution: Array.from({ length: channels }, () => new Float32Array(length)),
  };
}

export function growCandidates(c: WorstCandidates, channels: number): void {
  const size = Math.max(4096, c.pixel.length * 2);
  const grow = <T extends Int32Array | Float32Array | Uint8Array>(a: T, make: (n: number) => T): T => {
    const b = make(size);
    b.set(a);
    return b;
  };
  c.pixel = grow(c.pixel, (n) => new Int32Array(n));
  c.score = grow(c.score, (n) => new Float32Array(n));
  c.weight = grow(c.weight, (n) => new Float32Array(n));
  c.wellExposed = grow(c.wellExposed, (n) => new Uint8Array(n));
  c.contribution = Array.from({ length: channels }, (_, ch) => grow(c.contribution[ch] ?? new Float32Array(0), (n) => new Float32Array(n)));
}

/**
 * Two worst-frame records as one: per pixel the entry with the higher score, the
 * one from `earlier` on a tie (as one pass over the frames in order keeps it).
 * `later`'s frame indices are shifted by `frameShift`; `laterFrame`, when given,
 * is the frame of every entry of `later` (a frame's candidates). `laterCount`
 * entries of `later` are read.
 */
export function joinWorstRecords(earlier: WorstFrameRecord, later: Omit<WorstFrameRecord, "frame"> & { frame?: Int16Array }, laterCount: number, frameShift: number, laterFrame = -1): WorstFrameRecord {
  const na = earlier.pixel.length;
  const pa = earlier.pixel, pb = later.pixel;
  let both = 0;
  for (let i = 0, j = 0; i < na && j < laterCount;) {
    if (pa[i] < pb[j]) i++;
    else if (pa[i] > pb[j]) j++;
    else { both++; i++; j++; }
  }
  const channels = earlier.contribution.length;
  const out = createWorstRecord(channels, na + laterCount - both);
  const take = (o: number, from: WorstFrameRecord | typeof later, k: number, frame: number) => {
    out.pixel[o] = from.pixel[k];
    out.frame[o] = frame;
    out.score[o] = from.score[k];
    out.weight[o] = from.weight[k];
    out.wellExposed[o] = from.wellExposed[k];
    for (let c = 0; c < channels; c++) out.contribution[c][o] = from.contribution[c][k];
  };
  let i = 0, j = 0, o = 0;
  while (i < na || j < laterCount) {
    const a = i < na ? pa[i] : Infinity, b = j < laterCount ? pb[j] : Infinity;
    if (a < b || (a === b && !(later.score[j] > earlier.score[i]))) {
      take(o++, earlier, i, earlier.frame[i]);
      i++;
      if (a === b) j++;
    } else {
      take(o++, later, j, laterFrame >= 0 ? laterFrame : later.frame![j] + frameShift);
      j++;
      if (a === b) i++;
    }
  }
  return out;
}

/** Whether a pixel lies within r pixels (a square, cut at the image's edges) of a set pixel of `mask`. */
function isNearSet(mask: Uint8Array, i: number, width: number, height: number, r: number): boolean {
  const x = i % width;
  const y = (i - x) / width;
  for (let v = Math.max(0, y - r); v <= Math.min(height - 1, y + r); v++) {
    for (let u = Math.max(0, x - r); u <= Math.min(width - 1, x + r); u++) if (mask[v * width + u]) return true;
  }
  return false;
}

/**
 * Takes the worst frame out where it is an outlier, and in the wings around one
 * (within REJECT_GROW_PX) where it scores above OUTLIER_WING_SIGMAS; counts what
 * each frame lost (frameRejected, by frame index). The accumulator's exposure
 * weights, sums and coverage are changed in place.
 */
export function removeOutliers(worst: WorstFrameRecord, width: number, height: number, exposure: Float64Array, sums: Float32Array[], coverage: Uint16Array, frameRejected: number[]): void {
  const count = worst.pixel.length;
  let hit: Uint8Array | undefined;
  for (let j = 0; j < count; j++) if (worst.score[j] > OUTLIER_SIGMAS) (hit ??= new Uint8Array(width * height))[worst.pixel[j]] = 1;
  if (!hit) return;
  for (let j = 0; j < count; j++) {
    const i = worst.pixel[j];
    if (worst.score[j] <= (hit[i] ? OUTLIER_SIGMAS : OUTLIER_WING_SIGMAS)) continue;
    if (!hit[i] && !isNearSet(hit, i, width, height, REJECT_GROW_PX)) continue;
    // Keep the pixel when the worst frame was its only light: a lone frame has nothing to disagree with.
    if (!(exposure[i] - worst.weight[j] > 1e-6 * exposure[i])) continue;
    exposure[i] -= worst.weight[j];
    for (let c = 0; c < sums.length; c++) sums[c][i] -= worst.contribution[c][j];
    if (worst.wellExposed[j] && coverage[i] > 0) coverage[i]--;
    frameRejected[worst.frame[j]]++;
  }
}
