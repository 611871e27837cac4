// Bad-pixel maps: hot, stuck and dead pixels from calibration masters, or, without
// calibration frames, from pixels that stay isolated outliers at fixed sensor
// positions across a bracket. Pixels are masked (1), never interpolated. Pure.
import { computeMedian, computeRobustStats } from "./calibrate-combine";
import { ImagingError } from "./errors";
import { estimateDarkNoiseSigma } from "./linearize";
import type { LinearFrame } from "./types";

/** Thresholds of the bad-pixel maps. Every default is common practice, not a published value. */
export interface DefectThresholds {
  /** Hot: dark current above the median by this many robust sigmas (MAD x 1.4826). Default 5. */
  hotSigma: number;
  /**
   * Hot: ... and at least this many times the median dark current (offset-free data
   * only): the pixel-to-pixel spread of a sensor's dark current (tens of per cent)
   * would otherwise call its tail hot. Default 5.
   */
  hotFactor: number;
  /** Dead: flat response below this share of the median of its 8 neighbours. Default 0.5. */
  deadResponse: number;
  /** Stuck: flat response above this share of the median of its 8 neighbours (it does not follow the light). Default 1.5. */
  brightResponse: number;
  /**
   * A pixel reads "the same" in every master when its raw values spread by at most
   * this share of its level above the offset (and at most hotSigma sigmas of noise
   * otherwise). Such a pixel is stuck when its level stands above the offset, dead
   * when it does not. Default 0.1.
   */
  sameValueShare: number;
  /** Bracket: a pixel exceeds (or falls short of) all 8 neighbours by this many times their own spread (max - min). Default 3. */
  bracketContrast: number;
  /** Bracket: ... and by this many sigmas of the frame's dark noise. Default 8. */
  bracketSigma: number;
  /** Bracket: in at least this many frames at the same position. Default 2. */
  bracketMinFrames: number;
}

export const DEFAULT_DEFECT_THRESHOLDS: DefectThresholds = {
  hotSigma: 5,
  hotFactor: 5,
  deadResponse: 0.5,
  brightResponse: 1.5,
  sameValueShare: 0.1,
  bracketContrast: 2,
  bracketSigma: 8,
  bracketMinFrames: 2,
};

export interface BadPixelCounts {
  hot: number;
  stuck: number;
  dead: number;
  total: number;
}

/** Quantisation noise of integer data, 1 / sqrt(12) DN: the least spread a robust sigma may take. */
const MIN_SIGMA_DN = 1 / Math.sqrt(12);

export interface DefectInput {
  width: number;
  height: number;
  planeCount: number;
  bias?: Float32Array[];
  darks: { exposureS: number; planes: Float32Array[]; biasSubtracted: boolean }[];
  darkFit?: { offset: Float32Array[]; ratePerS: Float32Array[] };
  /** Normalised flat and the same scaled to the flats' signal level, DN above the offset. */
  flat?: Float32Array[];
  flatSignal?: Float32Array[];
  frames: { bias: LinearFrame[]; darks: LinearFrame[]; flats: LinearFrame[] };
}

/** Median of the 8 neighbours (fewer at the border) of pixel (x, y), by insertion into the scratch array. */
function neighbourMedian(p: Float32Array, width: number, height: number, x: number, y: number, scratch: Float64Array): number {
  let n = 0;
  for (let dy = -1; dy <= 1; dy++) {
    const yy = y + dy;
    if (yy < 0 || yy >= height) continue;
    for (let dx = -1; dx <= 1; dx++) {
      const xx = x + dx;
      if ((dx === 0 && dy === 0) || xx < 0 || xx >= width) continue;
      const v = p[yy * width + xx];
      let j = n++;
      while (j > 0 && scratch[j - 1] > v) {
        scratch[j] = scratch[j - 1];
        j--;
      }
      scratch[j] = v;
    }
  }
  return n % 2 === 1 ? scratch[n >> 1] : (scratch[(n >> 1) - 1] + scratch[n >> 1]) / 2;
}

function rawMedianAt(frames: LinearFrame[], c: number, i: number): number {
  const v = new Float32Array(frames.length);
  frames.forEach((f, k) => { v[k] = f.image.planes[c][i]; });
  return computeMedian(v);
}

/**
 * The level above which dark signal is hot: median + hotSigma robust sigmas and, for
 * offset-free data, at least hotFactor x the median (a median dark current near zero
 * leaves the sigma test alone).
 */
function computeHotLimit(values: Float32Array, t: DefectThresholds, minSigma: number, offsetFree: boolean): number {
  const s = computeRobustStats(values);
  const sigma = Math.max(s.sigma, minSigma);
  const bySigma = s.median + t.hotSigma * sigma;
  return offsetFree ? Math.max(bySigma, t.hotFactor * s.median) : bySigma;
}

/**
 * The bad-pixel map of a set of masters. Candidates: hot (dark current at the
 * longest dark exposure, or the fitted rate, above the median by hotSigma robust
 * sigmas and hotFactor times; with darks at two exposures and a bias, a candidate whose signal does not
 * grow with time), a fitted offset far above the others (no bias), and a flat
 * response outside [deadResponse, brightResponse] of the 8 neighbours. Each
 * candidate is then named by its raw values across every kind of calibration
 * frame: the same in all of them and above the offset -> stuck; the same and at the
 * offset -> dead; otherwise dead when the flat response is low, stuck when it is
 * high, hot when the dark current is. Counts are of pixels (a pixel flagged in
 * several planes counts once, as stuck before dead before hot).
 */
export function classifyDefects(input: DefectInput, t: DefectThresholds): { map: Uint8Array; counts: BadPixelCounts } {
  const { width, height, planeCount, bias, darks, darkFit, flat, frames } = input;
  const size = width * height;
  // 1 hot, 2 dead, 3 stuck: the larger wins across planes.
  const category = new Uint8Array(size);
  const scratch = new Float64Array(8);
  const offsetRef = bias ?? (darks.length > 0 && !darks[0].biasSubtracted ? darks[0].planes : undefined);
  for (let c = 0; c < planeCount; c++) {
    const hot = new Uint8Array(size);
    const candidate = new Uint8Array(size);
    const flatRatio = new Float32Array(size).fill(1);
    const timeStuck = new Uint8Array(size);
    if (darks.length > 0 && (bias || !darkFit)) {
      const longest = darks[darks.length - 1];
      const limit = computeHotLimit(longest.planes[c], t, MIN_SIGMA_DN, longest.biasSubtracted);
      for (let i = 0; i < size; i++) if (longest.planes[c][i] > limit) hot[i] = candidate[i] = 1;
      const shortest = darks[0];
      if (bias && darks.length >= 2 && shortest.exposureS <= 0.5 * longest.exposureS) {
        // Dark current grows with time; a value that stays put is stuck.
        for (let i = 0; i < size; i++) if (hot[i] && shortest.planes[c][i] >= 0.5 * longest.planes[c][i]) timeStuck[i] = 1;
      }
    } else if (darkFit) {
      const off = computeRobustStats(darkFit.offset[c]);
      const rateLimit = computeHotLimit(darkFit.ratePerS[c], t, MIN_SIGMA_DN / darks[darks.length - 1].exposureS, true);
      const offLimit = off.median + t.hotSigma * Math.max(off.sigma, MIN_SIGMA_DN);
      for (let i = 0; i < size; i++) {
        if (darkFit.ratePerS[c][i] > rateLimit) hot[i] = candidate[i] = 1;
        else if (darkFit.offset[c][i] > offLimit) timeStuck[i] = candidate[i] = 1;
      }
    }
    if (flat) {
      const f = flat[c];
      for (let y = 0; y < height; y++) {
        for (let x = 0; x < width; x++) {
          const i = y * width + x;
          const m = neighbourMedian(f, width, height, x, y, scratch);
          const r = m > 0 ? f[i] / m : 0;
          flatRatio[i] = r;
          if (r < t.deadResponse || r > t.brightResponse) candidate[i] = 1;
        }
      }
    }
    const ref = offsetRef?.[c];
    const refStats = ref ? computeRobustStats(ref) : undefined;
    for (let i = 0; i < size; i++) {
      if (!candidate[i]) continue;
      // Raw values of this pixel, one per kind and exposure of calibration frame.
      const values: number[] = [];
      if (frames.bias.length > 0) values.push(rawMedianAt(frames.bias, c, i));
      for (const d of darks) values.push(d.planes[c][i] + (d.biasSubtracted && bias ? bias[c][i] : 0));
      if (frames.flats.length > 0) values.push(rawMedianAt(frames.flats, c, i));
      let kind = 0;
      if (values.length >= 2 && refStats) {
        const lo = Math.min(...values);
        const hi = Math.max(...values);
        const above = lo - refStats.median;
        const noise = t.hotSigma * Math.max(refStats.sigma, MIN_SIGMA_DN);
        if (hi - lo <= Math.max(noise, t.sameValueShare * Math.max(0, above))) kind = above > noise ? 3 : 2;
      }
      if (kind === 0) {
        if (timeStuck[i]) kind = 3;
        else if (flatRatio[i] < t.deadResponse) kind = 2;
        else if (flatRatio[i] > t.brightResponse) kind = 3;
        else if (hot[i]) kind = 1;
      }
      if (kind > category[i]) category[i] = kind;
    }
  }
  const map = new Uint8Array(size);
  const counts: BadPixelCounts = { hot: 0, stuck: 0, dead: 0, total: 0 };
  for (let i = 0; i < size; i++) {
    const k = category[i];
    if (k === 0) continue;
    map[i] = 1;
    counts.total++;
    if (k === 1) counts.hot++;
    else if (k === 2) counts.dead++;
    else counts.stuck++;
  }
  return { map, counts };
}

/**
 * Bad pixels found from the bracket itself, for sets without calibration frames.
 * A defect stays at one sensor position and is a single pixel; the corona and the
 * prominences are smooth at the scale of the optics' blur, and the lunar limb is an
 * edge. So a pixel counts as an outlier in a frame when it exceeds all 8 of its
 * neighbours (or falls short of all of them) by bracketContrast times their own
 * spread (max - min) and by bracketSigma sigmas of the frame's dark noise
 * (Immerkaer 1996, estimateDarkNoiseSigma); a smooth peak or an edge always has a
 * neighbour close to it. It is masked when it is an outlier, in any plane, in at
 * least bracketMinFrames frames: a cosmic-ray hit or a trail sits in one frame only.
 * Hot pixels show in the long exposures, stuck pixels above the corona in short
 * ones and below it in long ones, dead pixels against the corona or the earthshine.
 * Frames must share one size; fewer than bracketMinFrames frames give an empty map.
 * Border pixels are never flagged (they lack a full neighbourhood).
 */
export function findBadPixelsFromBracket(frames: LinearFrame[], thresholds: Partial<DefectThresholds> = {}): Uint8Array {
  if (frames.length === 0) return new Uint8Array(0);
  const { width, height } = frames[0].image;
  for (const frame of frames) checkBracketFrameSize(frame, width, height, frames[0].name);
  return combineBracketOutliers(frames.map((frame) => findFrameOutliers(frame, thresholds)), width * height, thresholds);
}

function checkBracketFrameSize(frame: LinearFrame, width: number, height: number, firstName: string): void {
  const { image } = frame;
  if (image.width !== width || image.height !== height) {
    throw new ImagingError("size-mismatch", `is ${image.width} x ${image.height}, the bracket's first frame (${firstName}) ${width} x ${height}`, frame.name);
  }
}

/**
 * One frame's part of findBadPixelsFromBracket: the pixels that are outliers (see
 * there) in any of its planes, as ascending pixel indices. Each frame's list is
 * independent of the others', so frames may be searched side by side (in worker
 * threads, as they are decoded) and the lists combined by combineBracketOutliers.
 */
export function findFrameOutliers(frame: LinearFrame, thresholds: Partial<DefectThresholds> = {}): Uint32Array {
  const t = { ...DEFAULT_DEFECT_THRESHOLDS, ...thresholds };
  const { width, height, planes } = frame.image;
  const seen = new Uint8Array(width * height);
  let found = 0;
  for (const p of planes) {
    const sigma = Math.max(estimateDarkNoiseSigma(p, width, height), MIN_SIGMA_DN);
    const minExcess = t.bracketSigma * sigma;
    const contrast = t.bracketContrast;
    for (let y = 1; y < height - 1; y++) {
      const o = y * width;
      for (let i = o + 1; i < o + width - 1; i++) {
        const v = p[i];
        const left = p[i - 1];
        const right = p[i + 1];
        // The limit is at least minExcess and the 8 neighbours' extremes lie beyond the two on the row,
        // so a pixel within minExcess of either row neighbour's side cannot pass (rounding is monotone):
        // the full test below runs on a few pixels, with the same outcome as on all of them.
        // (Written so that a NaN neighbour, which the full test ignores, never rules a pixel out.)
        const notHigh = v - left <= minExcess || v - right <= minExcess;
        const notLow = left - v <= minExcess || right - v <= minExcess;
        if (notHigh && notLow) continue;
        let lo = Infinity;
        let hi = -Infinity;
        for (let dy = -width; dy <= width; dy += width) {
          for (let dx = -1; dx <= 1; dx++) {
            if (dy === 0 && dx === 0) continue;
            const u = p[i + dy + dx];
            if (u < lo) lo = u;
            if (u > hi) hi = u;
          }
        }
        const limit = Math.max(minExcess, contrast * (hi - lo));
        if ((v - hi > limit || lo - v > limit) && !seen[i]) {
          seen[i] = 1;
          found++;
        }
      }
    }
  }
  const outliers = new Uint32Array(found);
  if (found === 0) return outliers;
  for (let i = 0, k = 0; k < found; i++) if (seen[i]) outliers[k++] = i;
  return outliers;
}

/**
 * The bad-pixel map from every frame's outliers (findFrameOutliers): 1 where a
 * pixel is an outlier in at least bracketMinFrames frames. Fewer frames than
 * that give an empty map.
 */
export function combineBracketOutliers(outliers: Uint32Array[], size: number, thresholds: Partial<DefectThresholds> = {}): Uint8Array {
  const t = { ...DEFAULT_DEFECT_THRESHOLDS, ...thresholds };
  const map = new Uint8Array(size);
  if (outliers.length < t.bracketMinFrames) return map;
  if (t.bracketMinFrames <= 0) return map.fill(1);
  const counts = new Uint8Array(size);
  for (const list of outliers) for (const i of list) if (counts[i] < 255) counts[i]++;
  for (const list of outliers) for (const i of list) if (counts[i] >= t.bracketMinFrames) map[i] = 1;
  return map;
}
