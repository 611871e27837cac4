// The second merge pass's outlier record and rejection (see merge.ts): per
// master pixel the frame that disagrees most with the others, kept only where
// it is to be taken out, and taken out at the end of the pass.

/** Outliers: a score above this many sigmas of the leave-one-out prediction (after the frame's own z scale is measured). */
export const OUTLIER_SIGMAS = 5;
/** Around a frame's outlier, the same frame goes at this lower score too, so that a trail's wings below the threshold go with it. */
export const OUTLIER_WING_SIGMAS = 2.5;
/** Outliers grow by this many pixels (the wings' reach). */
const REJECT_GROW_PX = 2;

/**
 * The second pass's record of outliers: per master pixel, the frame with the
 * largest outlier score so far among those to be taken out, and what it added,
 * so that it can be taken out at the end. A frame is listed where it scores
 * above OUTLIER_SIGMAS, and in its own wings: where it scores above
 * OUTLIER_WING_SIGMAS within REJECT_GROW_PX of one of its own outliers
 * (keepOwnWings, as each frame closes). Entries are in ascending master order,
 * each pixel once, about 27 bytes each.
 *
 * The record grows with the outliers (trails, cosmic rays), not with the number
 * of frames. An earlier rule listed every pixel where any frame passed the
 * wing's threshold: with normal noise about 1.2 % of a frame's pixels do, so
 * over 200 frames nearly every pixel was listed (about 650 MB at 24
 * megapixels, twice that while a frame's entries were joined), and the wing
 * rule then took out whichever frame was noisiest beside another frame's trail.
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

/** Whether pixel i lies within r pixels (a square, cut at the image's edges) of a pixel in `hits`. */
function isNearHit(hits: Set<number>, i: number, width: number, height: number, r: number): boolean {
  const x = i % width;
  const y = (i - x) / width;
  for (let v = Math.max(0, y - r); v <= Math.min(height - 1, y + r); v++) {
    for (let u = Math.max(0, x - r); u <= Math.min(width - 1, x + r); u++) if (hits.has(v * width + u)) return true;
  }
  return false;
}

/**
 * Keeps, of one frame's candidates (its pixels above OUTLIER_WING_SIGMAS, in
 * master order), its outliers and its own wings: those above OUTLIER_SIGMAS, and
 * those within REJECT_GROW_PX of one. The arrays are compacted in place, in order.
 */
export function keepOwnWings(c: WorstCandidates, width: number, height: number): void {
  let hits: Set<number> | undefined;
  for (let j = 0; j < c.count; j++) if (c.score[j] > OUTLIER_SIGMAS) (hits ??= new Set()).add(c.pixel[j]);
  let kept = 0;
  if (hits) {
    for (let j = 0; j < c.count; j++) {
      if (!(c.score[j] > OUTLIER_SIGMAS) && !isNearHit(hits, c.pixel[j], width, height, REJECT_GROW_PX)) continue;
      if (kept !== j) {
        c.pixel[kept] = c.pixel[j];
        c.score[kept] = c.score[j];
        c.weight[kept] = c.weight[j];
        c.wellExposed[kept] = c.wellExposed[j];
        for (const plane of c.contribution) plane[kept] = plane[j];
      }
      kept++;
    }
  }
  c.count = kept;
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

/**
 * Takes each listed frame out of its pixel (every entry of the record is an
 * outlier or a wing of its frame's, see keepOwnWings); counts what each frame
 * lost (frameRejected, by frame index). The accumulator's exposure weights, sums
 * and coverage are changed in place.
 */
export function removeOutliers(worst: WorstFrameRecord, exposure: Float64Array, sums: Float32Array[], coverage: Uint16Array, frameRejected: number[]): void {
  for (let j = 0; j < worst.pixel.length; j++) {
    const i = worst.pixel[j];
    // Keep the pixel when the worst frame was its only light: a lone frame has nothing to disagree with.
    if (!(exposure[i] - worst.weight[j] > 1e-6 * exposure[i])) continue;
    exposure[i] -= worst.weight[j];
    for (let c = 0; c < sums.length; c++) sums[c][i] -= worst.contribution[c][j];
    if (worst.wellExposed[j] && coverage[i] > 0) coverage[i]--;
    frameRejected[worst.frame[j]]++;
  }
}
