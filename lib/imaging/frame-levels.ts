// Each frame's offset (bias pedestal) and relative transmission, solved from the
// bracket itself. Where two registered frames both see the same sky well, a
// linear sensor records y = o + tau t E: the counts of one frame against the
// other's fall on a straight line y_i = alpha y_j + beta with
//   alpha = (tau_i t_i) / (tau_j t_j),  beta = o_i - alpha o_j.
// A robust line through binned means of many such pairs (the frames' means over
// the same blocks of master pixels, level-samples.ts) gives alpha and beta for
// each pair of frames; least squares over all pairs then gives every
// frame's offset o and the log of its transmission tau (a passing cloud, or a
// shutter whose real time differs from the stated one).
//
// What the data cannot tell: offsets o_k = c tau_k t_k for any c look exactly
// like a uniform sky of brightness c added to the scene. The solve therefore
// prefers offsets that agree with each other (a small ridge toward their mean),
// which is exact for the common case of one camera with one pedestal; frames
// whose offset is already known (calibrated, or stated by the file) anchor it.
// The transmissions are fixed up to one factor: their weighted median is 1.
import { ImagingError } from "./errors";
import { collectPairSamples, createLevelGrid, measureBlockMeans, sortIndicesByValue, type LevelSource, type PairSamples } from "./level-samples";
import { computeMedian } from "./calibrate-combine";
import { solveCholesky } from "./linalg";
import { selectKth } from "./select";

export type { LevelSource, PairSamples } from "./level-samples";

export interface LevelFrame {
  exposureS: number;
  /** True when the offset is known (calibration frames or the file) and only a residual of zero is allowed. */
  isOffsetKnown: boolean;
}

export interface PairFit {
  i: number;
  j: number;
  alpha: number;
  beta: number;
  alphaSigma: number;
  betaSigma: number;
  /** Pixel pairs used. */
  count: number;
  /** The binned points the line went through (x = y_j, y = y_i) and their weights, for the refit through the solved offsets. */
  bins: { x: number[]; y: number[]; w: number[] };
}

export interface FrameLevels {
  /** Residual offset per frame in DN (0 for known ones), to add to the frame's black level. */
  offsets: number[];
  offsetSigmas: number[];
  /** Relative transmission per frame (1 = as the median frame). */
  transmissions: number[];
  transmissionSigmas: number[];
  /** Frames in no usable pair: their offset and transmission could not be determined. */
  undetermined: number[];
  pairs: PairFit[];
}

const BIN_COUNT = 48;
const MIN_PAIR_SAMPLES = 400;

/**
 * Interquartile mean: the mean of the middle half. Robust to the outliers a bin
 * may hold (a trail, a hot pixel), and unlike a median it is not held to whole
 * numbers by data quantized to integer DN, which biased short frames' offsets by
 * up to half a DN. The middle half is found by selection, not sorting; `values`
 * is reordered.
 */
function midMean(values: Float32Array): number {
  const n = values.length;
  const lo = Math.floor(n / 4);
  const hi = Math.max(lo + 1, Math.ceil((3 * n) / 4));
  // After these, values[lo .. hi - 1] hold the ranks lo .. hi - 1, in some order.
  selectKth(values, lo);
  selectKth(values, hi - 1, lo);
  let sum = 0;
  for (let k = lo; k < hi; k++) sum += values[k];
  return sum / (hi - lo);
}

/**
 * A robust straight line y_i = alpha y_j + beta through binned means: pairs
 * are sorted by y_j into equal-count bins, the interquartile mean of each coordinate taken
 * per bin (the first and last bins, where noise in y_j leaks across the bin
 * edge, are dropped), then weighted least squares over the bins with weights from
 * each bin's median absolute deviation, twice, dropping bins beyond 3 sigma.
 * Null when the pairs do not span a range that fixes a line.
 */
export function fitPairLine(samples: PairSamples): PairFit | null {
  const n = samples.yi.length;
  if (n < MIN_PAIR_SAMPLES) return null;
  const order = sortIndicesByValue(samples.yj);
  const per = Math.floor(n / BIN_COUNT);
  const xs: number[] = [];
  const ys: number[] = [];
  const ws: number[] = [];
  for (let b = 1; b < BIN_COUNT - 1; b++) {
    // The samples are float32: so are the bins, without loss.
    const x = new Float32Array(per);
    const y = new Float32Array(per);
    for (let k = 0; k < per; k++) {
      const idx = order[b * per + k];
      x[k] = samples.yj[idx];
      y[k] = samples.yi[idx];
    }
    const my = midMean(y);
    const dev = new Float32Array(per);
    for (let k = 0; k < per; k++) dev[k] = Math.abs(y[k] - my);
    // Standard error of the interquartile mean: about 1.15 sigma / sqrt(n) for Gaussian data, sigma from the MAD (1.4826 MAD).
    const se = (1.15 * 1.4826 * computeMedian(dev)) / Math.sqrt(per) + 1e-6 * Math.abs(my) + 1e-9;
    xs.push(midMean(x));
    ys.push(my);
    ws.push(1 / (se * se));
  }
  if (!(xs[xs.length - 1] > 1.5 * Math.max(xs[0], 1e-9) || xs[xs.length - 1] - xs[0] > 0)) return null;
  let keep = xs.map(() => true);
  let fit: { alpha: number; beta: number; alphaSigma: number; betaSigma: number } | null = null;
  for (let round = 0; round < 3; round++) {
    let sw = 0, sx = 0, sy = 0;
    for (let k = 0; k < xs.length; k++) if (keep[k]) { sw += ws[k]; sx += ws[k] * xs[k]; sy += ws[k] * ys[k]; }
    const mx = sx / sw, my = sy / sw;
    let sxx = 0, sxy = 0;
    for (let k = 0; k < xs.length; k++) if (keep[k]) { sxx += ws[k] * (xs[k] - mx) ** 2; sxy += ws[k] * (xs[k] - mx) * (ys[k] - my); }
    if (!(sxx > 0)) return null;
    const alpha = sxy / sxx;
    const beta = my - alpha * mx;
    // Scale the formal errors by the reduced chi-square when the bins scatter more than their own noise says.
    let chi2 = 0, used = 0;
    const resid = xs.map((x, k) => ys[k] - (alpha * x + beta));
    for (let k = 0; k < xs.length; k++) if (keep[k]) { chi2 += ws[k] * resid[k] ** 2; used++; }
    const inflate = Math.max(1, chi2 / Math.max(1, used - 2));
    fit = { alpha, beta, alphaSigma: Math.sqrt(inflate / sxx), betaSigma: Math.sqrt(inflate * (1 / sw + (mx * mx) / sxx)) };
    const next = resid.map((r, k) => Math.abs(r) * Math.sqrt(ws[k]) <= 3 * Math.sqrt(inflate));
    if (next.every((v, k) => v === keep[k])) break;
    keep = next;
    if (keep.filter(Boolean).length < 6) return null;
  }
  const kept = keep.map((k, idx) => (k ? idx : -1)).filter((idx) => idx >= 0);
  return fit ? { i: samples.i, j: samples.j, count: n, ...fit, bins: { x: kept.map((k) => xs[k]), y: kept.map((k) => ys[k]), w: kept.map((k) => ws[k]) } } : null;
}

/** Weighted median of values. */
function weightedMedian(values: number[], weights: number[]): number {
  const order = values.map((_, k) => k).sort((a, b) => values[a] - values[b]);
  const total = weights.reduce((s, w) => s + w, 0);
  let acc = 0;
  for (const k of order) {
    acc += weights[k];
    if (acc >= total / 2) return values[k];
  }
  return values[order[order.length - 1]];
}

/**
 * Offsets and transmissions of every frame from the pair fits (see the notes at
 * the top of this file). Frames in no pair are listed as undetermined and keep
 * offset 0 and transmission 1.
 */
export function solveFrameLevels(frames: LevelFrame[], fits: PairFit[]): FrameLevels {
  const n = frames.length;
  for (const f of frames) if (!(f.exposureS > 0)) throw new ImagingError("bad-exposure", `exposure must be positive, got ${f.exposureS}`);
  const inPair = new Set<number>();
  for (const p of fits) { inPair.add(p.i); inPair.add(p.j); }
  const undetermined = frames.map((_, k) => k).filter((k) => !inPair.has(k));

  // Offsets: o_i - alpha o_j = beta, known offsets fixed at zero, a ridge toward the unknowns' mean.
  const unknown = frames.map((_, k) => k).filter((k) => !frames[k].isOffsetKnown && inPair.has(k));
  const offsets = new Array<number>(n).fill(0);
  const offsetSigmas = new Array<number>(n).fill(0);
  for (const k of undetermined) offsetSigmas[k] = NaN;
  if (unknown.length > 0) {
    const m = unknown.length;
    const col = new Map(unknown.map((k, c) => [k, c]));
    const ata = new Float64Array(m * m);
    const atb = new Float64Array(m);
    let maxW = 0;
    for (const p of fits) {
      const w = 1 / Math.max(1e-12, p.betaSigma ** 2);
      maxW = Math.max(maxW, w);
      const row = new Map<number, number>();
      if (col.has(p.i)) row.set(col.get(p.i)!, 1);
      if (col.has(p.j)) row.set(col.get(p.j)!, (row.get(col.get(p.j)!) ?? 0) - p.alpha);
      for (const [a, va] of row) {
        atb[a] += w * va * p.beta;
        for (const [b, vb] of row) ata[a * m + b] += w * va * vb;
      }
    }
    // Ridge: eps sum (o_k - mean)^2, i.e. eps (I - J / m); small against the data, it only settles the null direction.
    const eps = 1e-4 * maxW;
    for (let a = 0; a < m; a++) for (let b = 0; b < m; b++) ata[a * m + b] += eps * ((a === b ? 1 : 0) - 1 / m);
    for (let a = 0; a < m; a++) ata[a * m + a] += 1e-12 * maxW;
    const solved = solveCholesky(ata, atb, m);
    unknown.forEach((k, c) => {
      offsets[k] = solved[c];
      offsetSigmas[k] = 1 / Math.sqrt(Math.max(1e-30, ata[c * m + c]));
    });
  }
  // Slopes again, each line now forced through the solved offsets (o_j, o_i): with the
  // intercept fixed, a short frame's slope is as sure as its bright pixels make it,
  // where a free intercept had traded off against it.
  const slopes = fits.map((p) => {
    let sxx = 0, sxy = 0;
    p.bins.x.forEach((x, k) => {
      const dx = x - offsets[p.j];
      sxx += p.bins.w[k] * dx * dx;
      sxy += p.bins.w[k] * dx * (p.bins.y[k] - offsets[p.i]);
    });
    return sxx > 0 && sxy > 0 ? { ...p, alpha: sxy / sxx, alphaSigma: Math.max(1 / Math.sqrt(sxx), 1e-6 * (sxy / sxx)) } : p;
  });
  // Log transmissions: lambda_i - lambda_j = ln alpha - ln(t_i / t_j), weighted by 1 / var(ln alpha).
  const lambda = new Float64Array(n);
  const lambdaSigma = new Float64Array(n).fill(NaN);
  if (fits.length > 0) {
    const ata = new Float64Array(n * n);
    const atb = new Float64Array(n);
    for (const p of slopes) {
      const w = 1 / Math.max(1e-12, (p.alphaSigma / p.alpha) ** 2);
      const r = Math.log(p.alpha) - Math.log(frames[p.i].exposureS / frames[p.j].exposureS);
      ata[p.i * n + p.i] += w; ata[p.j * n + p.j] += w;
      ata[p.i * n + p.j] -= w; ata[p.j * n + p.i] -= w;
      atb[p.i] += w * r; atb[p.j] -= w * r;
    }
    // Gauge: a tiny pull of every lambda toward zero; the weighted median is set to zero afterwards.
    const scale = Math.max(...Array.from({ length: n }, (_, k) => ata[k * n + k]), 1);
    for (let k = 0; k < n; k++) ata[k * n + k] += 1e-9 * scale + (inPair.has(k) ? 0 : 1);
    const solved = solveCholesky(ata, atb, n);
    const members = [...inPair];
    const shift = weightedMedian(members.map((k) => solved[k]), members.map((k) => ata[k * n + k]));
    for (const k of members) {
      lambda[k] = solved[k] - shift;
      lambdaSigma[k] = 1 / Math.sqrt(ata[k * n + k]);
    }
  }

  return {
    offsets,
    offsetSigmas,
    transmissions: Array.from(lambda, (l) => Math.exp(l)),
    transmissionSigmas: Array.from(lambdaSigma, (s, k) => s * Math.exp(lambda[k])),
    undetermined,
    pairs: fits,
  };
}

/** Pairs of frames to compare: each frame with the next one and the one after in exposure order (repeats included). */
export function choosePairs(exposuresS: number[]): { i: number; j: number }[] {
  const order = exposuresS.map((_, k) => k).sort((a, b) => exposuresS[a] - exposuresS[b] || a - b);
  const pairs: { i: number; j: number }[] = [];
  for (let k = 0; k < order.length; k++) {
    for (const d of [1, 2]) if (k + d < order.length) pairs.push({ i: order[k], j: order[k + d] });
  }
  return pairs;
}

/** Dark noise sigmas above which the regressor's (longer frame's) block must stand to be used. */
const SNR_MIN = 20;

/**
 * Every frame's offset and transmission from the registered bracket: block means
 * (level-samples.ts), pair lines, then the solve. `sources[k]` is undefined for a
 * frame the registration could not place. Each frame is read once, in exposure
 * order, and its block means kept only until its last pair is fitted, so that a
 * few frames' worth of blocks are held at any time, whatever the bracket's length.
 * `maxBlocks` bounds the blocks on the grid (MAX_LEVEL_BLOCKS by default).
 */
export function measureBracketLevels(
  sources: (LevelSource | undefined)[],
  frames: LevelFrame[],
  masterWidth: number,
  masterHeight: number,
  moon: { x: number; y: number; radiusPx: number },
  options: { maxBlocks?: number } = {},
): FrameLevels {
  const grid = createLevelGrid(masterWidth, masterHeight, moon, options.maxBlocks);
  const pairs = choosePairs(frames.map((f) => f.exposureS));
  const usesLeft = new Map<number, number>();
  for (const { i, j } of pairs) for (const k of [i, j]) usesLeft.set(k, (usesLeft.get(k) ?? 0) + 1);
  const held = new Map<number, Float32Array>();
  const meansOf = (k: number) => {
    let means = held.get(k);
    if (!means) held.set(k, (means = measureBlockMeans(sources[k], grid)));
    return means;
  };
  const release = (k: number) => {
    const left = usesLeft.get(k)! - 1;
    usesLeft.set(k, left);
    if (left === 0) held.delete(k);
  };
  const fits: PairFit[] = [];
  for (const { i, j } of pairs) {
    const fit = sources[i] && sources[j] ? fitPairLine(collectPairSamples(i, meansOf(i), j, meansOf(j), SNR_MIN * sources[j]!.noiseSigma)) : null;
    if (fit && fit.alpha > 0) fits.push(fit);
    release(i);
    release(j);
  }
  return solveFrameLevels(frames, fits);
}
