// HDR merge of registered frames.
//  - Linear data: photon-limited inverse-variance weighting. With counts
//    y_i ~ Poisson(E t_i) the maximum-likelihood radiance is E = sum y_i / sum t_i
//    over the frames not clipped at the pixel (Granados et al. 2010, CVPR,
//    "Optimal HDR reconstruction with linear digital cameras", from memory: the
//    read-noise-free limit of their weights).
//    Two refinements keep hand-overs between exposures invisible: a frame's weight
//    falls smoothly to zero as its counts approach the clip level (a cosine taper
//    over the top 40 % below it), so no frame switches off abruptly where it
//    saturates; and a second pass (createMergeAccumulator with a pilot) weighs
//    each frame by its share of signal over signal plus read noise at the pilot's
//    radiance, s = t E / (t E + sigma_r^2), which is the read-noise term of
//    Granados et al. (2010) for a gain of about one electron per DN, and finds
//    outliers (trails, cosmic rays, hot pixels that moved with tracking) against
//    the leave-one-out estimate of the other frames. A positive outlier in one
//    frame also pulls the pilot, so every other frame looks a little low there:
//    only the single worst frame at each pixel is taken out, once all frames are in,
//    where it scores as an outlier or in the wings of its own outliers.
//  - 8-bit data: Debevec and Malik (1997), SIGGRAPH, eq. 6:
//    ln E = sum w(Z_j) (g(Z_j) - ln t_j) / sum w(Z_j), hat weights w.
import { SERIAL_PLANE_RUNNER, type PlaneRunner } from "./plane-runner";
import { selectKth } from "./select";
import { ImagingError } from "./errors";
import { OUTLIER_WING_SIGMAS, createWorstRecord, growCandidates, joinWorstRecords, keepOwnWings, removeOutliers, type WorstCandidates, type WorstFrameRecord } from "./merge-outliers";

export { OUTLIER_SIGMAS, type WorstFrameRecord } from "./merge-outliers";

export interface MergeFrameInput {
  /** Registered linear planes: DN above black (linear) or relative light (8-bit). */
  planes: Float32Array[];
  exposureS: number;
  /** 1 = clipped (excluded). */
  clipped: Uint8Array;
  /** 1 = in the noise floor (still merged when linear; not counted as well exposed). */
  noiseFloor: Uint8Array;
  /** 1 = the frame covers this master pixel (after warping); all covered when absent. */
  covered?: Uint8Array;
  /** Value at which the frame clips, planes' units: gives a lower bound where every frame clipped. */
  clipLevel: number;
  /** 1 = a sensor defect (hot, stuck, dead) warped into master pixels: left out, with no lower bound. */
  masked?: Uint8Array;
  /** Dark (read) noise sigma of the frame, planes' units; used by the pilot pass's weights and outlier test. */
  noiseSigma?: number;
}

export interface FrameWeightStats {
  /** Master pixels where the frame contributed (covered, unclipped), fraction. */
  contributingFraction: number;
  /** Master pixels where the frame was well exposed (contributed and above the noise floor), fraction. */
  wellExposedFraction: number;
  /** The frame's share of all merge weight in the master. */
  weightShare: number;
  /** Master pixels the outlier test took from this frame (trail, cosmic ray, defect), fraction of those it covered. */
  rejectedFraction: number;
}

export interface MergeResult {
  width: number;
  height: number;
  /** Radiance per plane: DN/s for linear data, relative light per second for 8-bit data. */
  radiance: Float32Array[];
  /** How many frames exposed each pixel well (unclipped and above the noise floor). */
  coverage: Uint16Array;
  /** Pixels that no frame exposed well. */
  poorlyExposedCount: number;
  frameStats: FrameWeightStats[];
}

export type MergeWeighting = "photon" | "debevec-hat";

/** Debevec and Malik (1997) hat weight for 8-bit codes: w(z) = z - 0 for z <= 127.5, 255 - z above. */
export function computeHatWeight(code: number): number {
  return code <= 127.5 ? code : 255 - code;
}

/** OpenCV 4.6 MergeDebevec triangle weights (REFERENCES.md): w(z) = z + 1 below 128, 256 - z from 128; never zero. */
export function computeOpenCvTriangleWeight(code: number): number {
  return code < 128 ? code + 1 : 256 - code;
}

/**
 * Streaming merge: frames are added one at a time so that a large bracket never
 * needs all registered frames in memory at once.
 */
export interface MergeAccumulator {
  width: number;
  height: number;
  channels: number;
  weighting: MergeWeighting;
  /** photon: sum of counts per plane; debevec-hat: sum of w (ln v - ln t) per plane. Float32 keeps 24 bits, ample for DN sums. */
  sums: Float32Array[];
  /** photon: sum of exposure (one plane); debevec-hat: sum of weights per plane. Float64 so sums of short exposures stay exact. */
  weights: Float64Array[];
  /** Lower bound where everything clipped: the clip level over the shortest covering exposure. */
  fallback: Float32Array;
  coverage: Uint16Array;
  frameWeight: number[];
  frameContributing: number[];
  frameWellExposed: number[];
  /** debevec-hat: maps a linear value back to its 8-bit code. */
  codeOf?: (linear: number) => number;
  /** debevec-hat: mask of the contributing pixels of the frame being added, reused frame after frame (fresh pages are costly to fault in). */
  useScratch?: Uint8Array;
  /** The first pass, finished: its radiance serves the second pass's weights and leave-one-out outlier test. */
  pilot?: PhotonPilot;
  /** Second pass: where some frame's outlier score passes OUTLIER_WING_SIGMAS, the frame that disagrees most with the others, and what it added. */
  worst?: WorstFrameRecord;
  frameRejected: number[];
  frameConsidered: number[];
}

/**
 * What the second pass needs of the first: its sums and exposure weights, per
 * pixel. The exposure weights are accumulated in float64 during the first pass
 * and rounded once to float32 here: every use of the pilot divides a sum by its
 * weight or takes one frame's share out of both (leave-one-out), and the sums
 * are float32 already, so the weight's own rounding (2^-24 relative) is of the
 * same size as the sums' and the cancellation hits both alike. 96 MB less at 24
 * megapixels while the second pass runs.
 */
export interface PhotonPilot {
  sums: Float32Array[];
  weights: Float32Array;
}

/** Share of the clip level above which a frame's weight starts to fall (cosine taper to zero at the clip level). */
export const CLIP_TAPER_START = 0.6;
/**
 * Negative deviations count at this share: trails, cosmic rays and hot pixels add
 * light, and a frame that only looks low because another frame's outlier pulled the
 * pilot must not be taken for the culprit.
 */
const NEGATIVE_SCORE_SHARE = 0.6;

/** Weight factor of a count v against the clip level: 1 below CLIP_TAPER_START of it, a raised cosine to 0 at it. */
export function computeClipTaper(v: number, clipLevel: number): number {
  const u = v / clipLevel;
  if (u <= CLIP_TAPER_START) return 1;
  if (u >= 1) return 0;
  return 0.5 * (1 + Math.cos((Math.PI * (u - CLIP_TAPER_START)) / (1 - CLIP_TAPER_START)));
}

export function createMergeAccumulator(
  width: number,
  height: number,
  channels: number,
  weighting: MergeWeighting,
  codeOf?: (linear: number) => number,
  pilot?: PhotonPilot,
  runner: PlaneRunner = SERIAL_PLANE_RUNNER,
): MergeAccumulator {
  if (weighting === "debevec-hat" && !codeOf) throw new ImagingError("bad-parameter", "debevec-hat merge needs a map from linear value to 8-bit code");
  const n = width * height;
  const weightPlanes = weighting === "photon" ? 1 : channels;
  // A runner's arrays, so that its threads can add bands of rows (merge-kernels.ts).
  return {
    width, height, channels, weighting,
    sums: Array.from({ length: channels }, () => runner.float32(n)),
    weights: Array.from({ length: weightPlanes }, () => runner.float64(n)),
    fallback: runner.float32(n),
    coverage: runner.uint16(n),
    frameWeight: [], frameContributing: [], frameWellExposed: [], frameRejected: [], frameConsidered: [], codeOf, pilot,
    worst: pilot ? createWorstRecord(channels) : undefined,
  };
}

/** The finished first pass as the second pass's pilot (its sums shared, its exposure weights rounded to float32: see PhotonPilot). */
export function toPilot(acc: MergeAccumulator, runner: PlaneRunner = SERIAL_PLANE_RUNNER): PhotonPilot {
  if (acc.weighting !== "photon") throw new ImagingError("bad-parameter", "only the linear merge has a second pass");
  const weights = runner.float32(acc.weights[0].length, true);
  weights.set(acc.weights[0]);
  // The first pass's exposure weights and the rest of its arrays go back to the runner (the sums live on in the pilot).
  runner.release(acc.weights[0], acc.fallback, acc.coverage);
  return { sums: acc.sums, weights };
}

/**
 * The arrays of an accumulator that adding a band writes or reads, as plain data
 * a thread can be given (a runner's shared arrays): see openMergeArrays.
 */
export interface MergeArrays {
  width: number;
  height: number;
  channels: number;
  sums: Float32Array[];
  exposure: Float64Array;
  fallback: Float32Array;
  coverage: Uint16Array;
  pilotSums?: Float32Array[];
  pilotWeights?: Float32Array;
  /** Second pass with a worst-frame record: used pixels are scored, and those past the wing become candidates. */
  scoring: boolean;
}

/** A linear merge's arrays (see MergeArrays). */
export function listMergeArrays(acc: MergeAccumulator): MergeArrays {
  if (acc.weighting !== "photon") throw new ImagingError("bad-parameter", "only the linear merge adds bands of rows on threads");
  const { width, height, channels, sums, fallback, coverage, pilot } = acc;
  return { width, height, channels, sums, exposure: acc.weights[0], fallback, coverage, pilotSums: pilot?.sums, pilotWeights: pilot?.weights, scoring: Boolean(acc.worst) };
}

/**
 * An accumulator over the arrays of listMergeArrays, for addBandToMerge on another
 * thread: its pixels are the original's; its per-frame records are its own (empty),
 * and the bands' figures go to the tally the caller gives.
 */
export function openMergeArrays(arrays: MergeArrays): MergeAccumulator {
  const { width, height, channels, sums, exposure, fallback, coverage, pilotSums, pilotWeights, scoring } = arrays;
  return {
    width, height, channels, weighting: "photon", sums, weights: [exposure], fallback, coverage,
    pilot: pilotSums && pilotWeights ? { sums: pilotSums, weights: pilotWeights } : undefined,
    worst: scoring ? createWorstRecord(channels) : undefined,
    frameWeight: [], frameContributing: [], frameWellExposed: [], frameRejected: [], frameConsidered: [],
  };
}

/**
 * The frame's outlier scale from its tally's sample (second pass with a
 * worst-frame record), measured once as the first band's addition would; undefined
 * without a record.
 */
export function settleScoreScale(acc: MergeAccumulator, tally: MergeFrameTally): number | undefined {
  if (!acc.worst || !acc.pilot) return undefined;
  return (tally.scale ??= measureScoreScale(tally.sample));
}

/**
 * Second pass, per frame: z = (y - t E_loo) / sigma for each plane, with E_loo the
 * first pass's estimate without this frame and sigma^2 = y + sigma_r^2 + t^2 E_loo / T_loo
 * (photon noise at one electron per DN, read noise, the leave-one-out estimate's
 * own noise). The worst plane's z, rounded to float32 as the score is kept; 0
 * where there is nothing to compare. `sums` and `weights` are the pilot's, `i`
 * indexes them; `planes` are the frame's, `k` indexes them; `taperK` is the
 * frame's clip taper there, before the noise share.
 */
function computeRawScore(sums: Float32Array[], weights: Float32Array, planes: Float32Array[], i: number, k: number, t: number, taperK: number, read2: number): number {
  const tLoo = weights[i] - taperK * t;
  if (!(tLoo > 1e-3 * t)) return 0;
  let worst = 0;
  for (let c = 0; c < planes.length; c++) {
    const y = planes[c][k];
    const eLoo = (sums[c][i] - taperK * y) / tLoo;
    const predicted = t * eLoo;
    const variance = Math.max(predicted, 0) + read2 + (t * t * Math.max(eLoo, 0)) / tLoo + 1e-6;
    const zc = (y - predicted) / Math.sqrt(variance);
    if (Math.abs(zc) > Math.abs(worst)) worst = zc;
  }
  return Math.fround(worst);
}

/**
 * Share of the wing's square below which the second pass's screen passes a pixel without
 * scoring it: 2 % under, against rounding errors of about 1e-15 relative in the
 * screen's arithmetic, which multiplies by one reciprocal where computeRawScore divides.
 */
const SCREEN_SHARE = 0.98;

/**
 * True when every plane's squared deviation is at most `bound` times its variance
 * (the terms of computeRawScore), or when computeRawScore would give 0: such a
 * pixel's |z| is below sqrt(bound / SCREEN_SHARE) on every plane. False (score it)
 * for anything else, a NaN included.
 */
function isPlainPixel(sums: Float32Array[], weights: Float32Array, planes: Float32Array[], i: number, k: number, t: number, taperK: number, read2: number, bound: number): boolean {
  const tLoo = weights[i] - taperK * t;
  if (!(tLoo > 1e-3 * t)) return true;
  const inverse = 1 / tLoo;
  for (let c = 0; c < planes.length; c++) if (!isPlainPlane(sums[c][i], planes[c][k], inverse, t, taperK, read2, bound)) return false;
  return true;
}

/** isPlainPixel's test on one plane: the pilot's sum there, the frame's value y, and 1 / T_loo. */
function isPlainPlane(sum: number, y: number, inverse: number, t: number, taperK: number, read2: number, bound: number): boolean {
  const eLoo = (sum - taperK * y) * inverse;
  const predicted = t * eLoo;
  const variance = Math.max(predicted, 0) + read2 + t * t * Math.max(eLoo, 0) * inverse + 1e-6;
  const d = y - predicted;
  return d * d <= bound * variance;
}

/** The clip taper of a frame's pixel k on its brightest plane (see computeClipTaper). */
function computePixelTaper(planes: Float32Array[], clipLevel: number, k: number): number {
  let v = planes[0][k];
  for (let c = 1; c < planes.length; c++) if (planes[c][k] > v) v = planes[c][k];
  return computeClipTaper(v, clipLevel);
}

/** Whether a frame's pixel k takes part: covered, no defect, not clipped. */
function isPixelUsable(frame: MergeFrameInput, k: number): boolean {
  return !(frame.covered && !frame.covered[k]) && !(frame.masked && frame.masked[k]) && !frame.clipped[k];
}

/** Master pixels between two samples of a frame's outlier scores (an odd stride avoids locking onto image columns). */
function scoreSampleStep(acc: MergeAccumulator): number {
  return Math.max(1, Math.floor((acc.width * acc.height) / 200_000)) | 1;
}

/** Adds the |z| of a frame's pixel k (master pixel i) to its tally's sample, where it takes part and has something to compare with. */
function sampleScoreAt(pilot: PhotonPilot, frame: MergeFrameInput, i: number, k: number, read2: number, tally: MergeFrameTally): void {
  if (!isPixelUsable(frame, k)) return;
  const z = computeRawScore(pilot.sums, pilot.weights, frame.planes, i, k, frame.exposureS, computePixelTaper(frame.planes, frame.clipLevel, k), read2);
  if (z !== 0) tally.sample.push(Math.abs(z));
}

/**
 * A frame's outlier scores need the frame's own z scale (the robust spread of its
 * z values, which absorbs a gain other than one) before any pixel is scored: a
 * caller adding a frame band by band first passes every band to
 * sampleScoreBand (or the sampled pixels alone to sampleScorePoints), then gives
 * the tally's sample to the bands' additions (addBandToMerge). `offset` is the
 * master index of the band's first pixel.
 */
export function sampleScoreBand(acc: MergeAccumulator, band: MergeFrameInput, offset: number, tally: MergeFrameTally): void {
  if (!acc.pilot || acc.weighting !== "photon") return;
  const len = checkBand(acc, band, offset);
  const step = scoreSampleStep(acc);
  const read2 = (band.noiseSigma ?? 0) ** 2;
  for (let i = Math.ceil(offset / step) * step; i < offset + len; i += step) sampleScoreAt(acc.pilot, band, i, i - offset, read2, tally);
}

/** The sample's pixels of each pass, made once (they depend on the master's size alone). */
const samplePixelsOf = new WeakMap<MergeAccumulator, Int32Array>();

/**
 * The master pixels at which sampleScoreBand samples a frame's scores, in order
 * (the same for every frame of a pass: one array a pass, not to be written).
 */
export function listScoreSamplePixels(acc: MergeAccumulator): Int32Array {
  let pixels = samplePixelsOf.get(acc);
  if (!pixels) {
    const step = scoreSampleStep(acc);
    pixels = new Int32Array(Math.ceil((acc.width * acc.height) / step));
    for (let j = 0; j < pixels.length; j++) pixels[j] = j * step;
    samplePixelsOf.set(acc, pixels);
  }
  return pixels;
}

/**
 * sampleScoreBand over a whole frame given at its sampled pixels only: `points`
 * holds at position j the frame's value at master pixel pixels[j], for the
 * pixels of listScoreSamplePixels. The same sample as sampleScoreBand over every
 * band, for the cost of those pixels' warp instead of the frame's.
 */
export function sampleScorePoints(acc: MergeAccumulator, points: MergeFrameInput, pixels: Int32Array, tally: MergeFrameTally): void {
  if (!acc.pilot || acc.weighting !== "photon") return;
  const len = checkBand(acc, points, 0);
  if (len !== pixels.length) throw new ImagingError("size-mismatch", `score sample: ${len} values for ${pixels.length} pixels`);
  const read2 = (points.noiseSigma ?? 0) ** 2;
  for (let j = 0; j < len; j++) sampleScoreAt(acc.pilot, points, pixels[j], j, read2, tally);
}

/** 1.4826 MAD of the sampled |z| (at least 0.25), or 1 with too few samples. */
function measureScoreScale(sample: number[]): number {
  if (sample.length <= 100) return 1;
  // The element a sort would put in the middle, found by selection (the |z| are float32 numbers already).
  const values = Float32Array.from(sample);
  selectKth(values, values.length >> 1);
  return Math.max(0.25, 1.4826 * values[values.length >> 1]);
}

/** The outlier score of a raw z: z over the frame's scale, negative ones at NEGATIVE_SCORE_SHARE; float32 as the worst-frame record keeps it. */
function scaleScore(z: number, scale: number): number {
  return Math.fround(z > 0 ? z / scale : (NEGATIVE_SCORE_SHARE * -z) / scale);
}

/** One frame's running figures while its bands are added (createMergeTally, then addBandToMerge per band, then closeMergeFrame). */
export interface MergeFrameTally {
  weightSum: number;
  contributing: number;
  well: number;
  considered: number;
  /** |z| at the regular sample of master pixels (second pass), gathered by sampleScoreBand. */
  sample: number[];
  /** The frame's z scale, measured from the sample when the first band is added. */
  scale?: number;
  /** Its pixels that score above OUTLIER_WING_SIGMAS, for the worst-frame record (closeMergeFrame files them). */
  candidates?: WorstCandidates;
}

export function createMergeTally(): MergeFrameTally {
  return { weightSum: 0, contributing: 0, well: 0, considered: 0, sample: [] };
}

function checkBand(acc: MergeAccumulator, band: MergeFrameInput, offset: number): number {
  const len = band.clipped.length;
  if (band.planes.length !== acc.channels) throw new ImagingError("size-mismatch", `merge expects ${acc.channels} planes, got ${band.planes.length}`);
  if (band.planes.some((p) => p.length !== len) || !(Number.isInteger(offset) && offset >= 0 && offset + len <= acc.width * acc.height)) {
    throw new ImagingError("size-mismatch", "merge inputs differ in size");
  }
  return len;
}

/** A scratch array of at least `len` entries kept on the accumulator, as a view of exactly `len`. */
function scratchOf<T extends Uint8Array | Float32Array>(held: T | undefined, len: number, make: (len: number) => T): { array: T; held: T } {
  const array = held && held.length >= len ? held : make(len);
  return { array: array.subarray(0, len) as T, held: array };
}

// The loops of addBandToMerge, one small function each: V8 optimizes a function
// with one hot loop at once, where one long function with many loops was
// compiled again and again as each loop became hot (about 4x slower measured).
// The linear merge's passes are one loop each (addFirstPassBand, addSecondPassBand):
// one read of the band's arrays per pixel instead of one per step.

/** use[k] = 1 where the band's pixel takes part (covered, no defect, not clipped); where clipped, the fallback's lower bound. */
function markUsable(band: MergeFrameInput, use: Uint8Array, fallback: Float32Array, offset: number, bound: number): void {
  const { covered, masked, clipped } = band;
  for (let k = 0; k < use.length; k++) {
    if (covered && !covered[k]) continue;
    if (masked && masked[k]) continue;
    if (clipped[k]) {
      if (bound > fallback[offset + k]) fallback[offset + k] = bound;
      continue;
    }
    use[k] = 1;
  }
}

/**
 * First pass over one band of a linear frame, in one loop (one pass over the band's
 * arrays): a pixel takes part when covered, free of defects and not clipped (a
 * clipped one raises the fallback's lower bound `bound`); its weight is its clip
 * taper (computePixelTaper, kept as float32) times the exposure; the weighted
 * planes go into the sums, and the pixel counts as contributing (and, above the
 * noise floor, as covering).
 */
function addFirstPassBand(acc: MergeAccumulator, band: MergeFrameInput, offset: number, bound: number, tally: MergeFrameTally): void {
  const { planes, covered, masked, clipped, noiseFloor, clipLevel, exposureS: t } = band;
  const { sums, fallback, coverage } = acc;
  const exposure = acc.weights[0];
  const channels = planes.length;
  const len = clipped.length;
  let weightSum = tally.weightSum, contributing = 0, well = 0;
  for (let k = 0; k < len; k++) {
    if (covered && !covered[k]) continue;
    if (masked && masked[k]) continue;
    const i = offset + k;
    if (clipped[k]) {
      if (bound > fallback[i]) fallback[i] = bound;
      continue;
    }
    const taper = Math.fround(computePixelTaper(planes, clipLevel, k));
    if (!(taper > 0)) continue;
    exposure[i] += taper * t;
    weightSum += taper * t;
    for (let c = 0; c < channels; c++) sums[c][i] += taper * planes[c][k];
    contributing++;
    if (!noiseFloor[k]) {
      coverage[i]++;
      well++;
    }
  }
  tally.weightSum = weightSum;
  tally.contributing += contributing;
  tally.well += well;
}

/**
 * Second pass over one band, in one loop: as the first, but each pixel's weight is
 * its clip taper times its noise share at the pilot's radiance (float32), and,
 * with a worst-frame record (`candidates`, `scale`), each used pixel's outlier
 * score is taken with its clip taper alone; pixels scoring above
 * OUTLIER_WING_SIGMAS join the frame's candidates.
 */
function addSecondPassBand(
  acc: MergeAccumulator, pilot: PhotonPilot, band: MergeFrameInput, offset: number, bound: number, read2: number,
  scale: number | undefined, candidates: WorstCandidates | undefined, tally: MergeFrameTally,
): void {
  const { planes, covered, masked, clipped, noiseFloor, clipLevel, exposureS: t } = band;
  const { sums, fallback, coverage } = acc;
  const exposure = acc.weights[0];
  const channels = planes.length;
  const len = clipped.length;
  const lum = pilot.sums[channels === 3 ? 1 : 0];
  const pilotWeights = pilot.weights;
  // See isPlainPixel: below this, a pixel cannot pass the wing.
  const screenBound = scale === undefined ? 0 : SCREEN_SHARE * (OUTLIER_WING_SIGMAS * scale) ** 2;
  let weightSum = tally.weightSum, contributing = 0, well = 0, considered = 0;
  for (let k = 0; k < len; k++) {
    if (covered && !covered[k]) continue;
    if (masked && masked[k]) continue;
    const i = offset + k;
    if (clipped[k]) {
      if (bound > fallback[i]) fallback[i] = bound;
      continue;
    }
    const clipTaper = Math.fround(computePixelTaper(planes, clipLevel, k));
    const expected = pilotWeights[i] > 0 ? (t * lum[i]) / pilotWeights[i] : 0;
    const w = Math.fround(clipTaper * (expected > 0 ? expected / (expected + read2) : 1));
    if (!(w > 0)) continue;
    exposure[i] += w * t;
    weightSum += w * t;
    if (candidates && scale !== undefined) {
      considered++;
      if (!isPlainPixel(pilot.sums, pilotWeights, planes, i, k, t, clipTaper, read2, screenBound)) addCandidate(candidates, pilot, planes, i, k, t, clipTaper, read2, scale, w, noiseFloor[k]);
    }
    for (let c = 0; c < channels; c++) sums[c][i] += w * planes[c][k];
    contributing++;
    if (!noiseFloor[k]) {
      coverage[i]++;
      well++;
    }
  }
  tally.weightSum = weightSum;
  tally.contributing += contributing;
  tally.well += well;
  tally.considered += considered;
}

// The passes for three planes (colour frames, nearly every bracket), written out:
// the planes and sums in locals, where the loops above index an array of them per
// pixel. The same arithmetic in the same order, so the same bits; about half the time
// at 24 megapixels (37 against 80 ns a pixel for the first pass, measured).

/** addFirstPassBand for three planes. */
function addFirstPassBand3(acc: MergeAccumulator, band: MergeFrameInput, offset: number, bound: number, tally: MergeFrameTally): void {
  const { planes, covered, masked, clipped, noiseFloor, clipLevel, exposureS: t } = band;
  const { fallback, coverage } = acc;
  const exposure = acc.weights[0];
  const p0 = planes[0], p1 = planes[1], p2 = planes[2];
  const s0 = acc.sums[0], s1 = acc.sums[1], s2 = acc.sums[2];
  const len = clipped.length;
  let weightSum = tally.weightSum, contributing = 0, well = 0;
  for (let k = 0; k < len; k++) {
    const i = offset + k;
    if (isLeftOut(covered, masked, clipped, fallback, k, i, bound)) continue;
    const y0 = p0[k], y1 = p1[k], y2 = p2[k];
    const taper = Math.fround(computeClipTaper(brightest(y0, y1, y2), clipLevel));
    if (!(taper > 0)) continue;
    exposure[i] += taper * t;
    weightSum += taper * t;
    s0[i] += taper * y0;
    s1[i] += taper * y1;
    s2[i] += taper * y2;
    contributing++;
    well += countWellExposed(noiseFloor[k], coverage, i);
  }
  closeBandTally(tally, weightSum, contributing, well);
}

/**
 * True for a frame pixel the merge leaves out: outside the frame, masked, or
 * clipped (a clipped pixel still raises the master pixel's fallback to `bound`).
 */
function isLeftOut(covered: Uint8Array | undefined, masked: Uint8Array | undefined, clipped: Uint8Array, fallback: Float32Array, k: number, i: number, bound: number): boolean {
  if (covered !== undefined && covered[k] === 0) return true;
  if (masked !== undefined && masked[k] !== 0) return true;
  if (clipped[k] === 0) return false;
  if (bound > fallback[i]) fallback[i] = bound;
  return true;
}

/** 1, counting the master pixel's coverage, when the frame's pixel is above its noise floor; else 0. */
function countWellExposed(noiseFloorK: number, coverage: Uint16Array, i: number): number {
  if (noiseFloorK !== 0) return 0;
  coverage[i]++;
  return 1;
}

/** A band's weight sum (a running total) and counts into the frame's tally. */
function closeBandTally(tally: MergeFrameTally, weightSum: number, contributing: number, well: number): void {
  tally.weightSum = weightSum;
  tally.contributing += contributing;
  tally.well += well;
}

/** The largest of three values, as computePixelTaper picks it (the first on a tie). */
function brightest(y0: number, y1: number, y2: number): number {
  let v = y0;
  if (y1 > v) v = y1;
  if (y2 > v) v = y2;
  return v;
}

/** addSecondPassBand for three planes. */
function addSecondPassBand3(
  acc: MergeAccumulator, pilot: PhotonPilot, band: MergeFrameInput, offset: number, bound: number, read2: number,
  scale: number | undefined, candidates: WorstCandidates | undefined, tally: MergeFrameTally,
): void {
  const { planes, covered, masked, clipped, noiseFloor, clipLevel, exposureS: t } = band;
  const { fallback, coverage } = acc;
  const exposure = acc.weights[0];
  const p0 = planes[0], p1 = planes[1], p2 = planes[2];
  const s0 = acc.sums[0], s1 = acc.sums[1], s2 = acc.sums[2];
  const q0 = pilot.sums[0], q1 = pilot.sums[1], q2 = pilot.sums[2];
  const len = clipped.length;
  const pilotWeights = pilot.weights;
  const scoring = candidates !== undefined && scale !== undefined;
  // See isPlainPixel: below this, a pixel cannot pass the wing.
  const screenBound = scale === undefined ? 0 : SCREEN_SHARE * (OUTLIER_WING_SIGMAS * scale) ** 2;
  let weightSum = tally.weightSum, contributing = 0, well = 0, considered = 0;
  for (let k = 0; k < len; k++) {
    const i = offset + k;
    if (isLeftOut(covered, masked, clipped, fallback, k, i, bound)) continue;
    const y0 = p0[k], y1 = p1[k], y2 = p2[k];
    const clipTaper = Math.fround(computeClipTaper(brightest(y0, y1, y2), clipLevel));
    const pilotWeight = pilotWeights[i];
    // The pilot's luminance plane is the middle one (green) of three.
    const expected = pilotWeight > 0 ? (t * q1[i]) / pilotWeight : 0;
    const w = Math.fround(clipTaper * (expected > 0 ? expected / (expected + read2) : 1));
    if (!(w > 0)) continue;
    exposure[i] += w * t;
    weightSum += w * t;
    if (scoring) {
      considered++;
      const tLoo = pilotWeight - clipTaper * t;
      const inverse = 1 / tLoo;
      const plain = !(tLoo > 1e-3 * t) || (isPlainPlane(q0[i], y0, inverse, t, clipTaper, read2, screenBound)
        && isPlainPlane(q1[i], y1, inverse, t, clipTaper, read2, screenBound) && isPlainPlane(q2[i], y2, inverse, t, clipTaper, read2, screenBound));
      if (!plain) addCandidate(candidates!, pilot, planes, i, k, t, clipTaper, read2, scale!, w, noiseFloor[k]);
    }
    s0[i] += w * y0;
    s1[i] += w * y1;
    s2[i] += w * y2;
    contributing++;
    well += countWellExposed(noiseFloor[k], coverage, i);
  }
  closeBandTally(tally, weightSum, contributing, well);
  tally.considered += considered;
}

/** Scores a frame's pixel k (master pixel i) that the screen did not pass, and lists it among the frame's candidates when it passes the wing. */
function addCandidate(candidates: WorstCandidates, pilot: PhotonPilot, planes: Float32Array[], i: number, k: number, t: number, clipTaper: number, read2: number, scale: number, w: number, noiseFloorK: number): void {
  const score = scaleScore(computeRawScore(pilot.sums, pilot.weights, planes, i, k, t, clipTaper, read2), scale);
  if (!(score > OUTLIER_WING_SIGMAS)) return;
  const channels = planes.length;
  if (candidates.count === candidates.pixel.length) growCandidates(candidates, channels);
  const at = candidates.count++;
  candidates.pixel[at] = i;
  candidates.score[at] = score;
  candidates.weight[at] = w * t;
  candidates.wellExposed[at] = noiseFloorK ? 0 : 1;
  for (let c = 0; c < channels; c++) candidates.contribution[c][at] = w * planes[c][k];
}

/** Coverage of the used pixels above the noise floor; the tally's counts. */
function countUsed(use: Uint8Array, noiseFloor: Uint8Array, coverage: Uint16Array, offset: number, tally: MergeFrameTally): void {
  let contributing = 0, well = 0;
  for (let k = 0; k < use.length; k++) {
    if (!use[k]) continue;
    contributing++;
    if (!noiseFloor[k]) {
      coverage[offset + k]++;
      well++;
    }
  }
  tally.contributing += contributing;
  tally.well += well;
}

/**
 * Adds one band of a frame: master pixels offset .. offset + band length, in
 * master order (a whole frame is one band at offset 0). Bands of one frame come
 * in order, each once; the frame's figures add up in `tally`, and
 * closeMergeFrame records them. Every figure is the one a whole-frame addition
 * gives, bit for bit: each pixel's arithmetic is its own, and the sums over
 * pixels run in the same order.
 */
export function addBandToMerge(acc: MergeAccumulator, band: MergeFrameInput, offset: number, tally: MergeFrameTally): void {
  const len = checkBand(acc, band, offset);
  const t = band.exposureS;
  const { noiseFloor } = band;
  if (acc.weighting === "photon") {
    const bound = band.clipLevel / t;
    const { pilot, worst } = acc;
    if (!pilot) (acc.channels === 3 ? addFirstPassBand3 : addFirstPassBand)(acc, band, offset, bound, tally);
    else {
      const read2 = (band.noiseSigma ?? 0) ** 2;
      const scale = worst ? (tally.scale ??= measureScoreScale(tally.sample)) : undefined;
      const candidates = worst ? (tally.candidates ??= { count: 0, pixel: new Int32Array(0), score: new Float32Array(0), weight: new Float32Array(0), wellExposed: new Uint8Array(0), contribution: [] }) : undefined;
      (acc.channels === 3 ? addSecondPassBand3 : addSecondPassBand)(acc, pilot, band, offset, bound, read2, scale, candidates, tally);
    }
    return;
  }
  // Masks, coverage and the clipped fallback (shared by every plane).
  const useScratch = scratchOf(acc.useScratch, len, (m) => new Uint8Array(m));
  acc.useScratch = useScratch.held;
  const use = useScratch.array.fill(0);
  markUsable(band, use, acc.fallback, offset, band.clipLevel / t);
  countUsed(use, noiseFloor, acc.coverage, offset, tally);
  // One band only (a whole frame): the weight sum runs plane by plane, as it always has.
  if (offset !== 0 || len !== acc.width * acc.height) throw new ImagingError("bad-parameter", "the 8-bit merge adds whole frames only");
  const logT = Math.log(t);
  const codeOf = acc.codeOf!;
  for (let c = 0; c < acc.channels; c++) {
    const sum = acc.sums[c];
    const weight = acc.weights[c];
    const p = band.planes[c];
    for (let i = 0; i < len; i++) {
      if (!use[i]) continue;
      const v = p[i];
      if (!(v > 0)) continue;
      const w = computeHatWeight(codeOf(v));
      if (w <= 0) continue;
      sum[i] += w * (Math.log(v) - logT);
      weight[i] += w;
      tally.weightSum += w / acc.channels;
    }
  }
}

/** Records a frame whose bands have all been added (and files its outlier candidates in the worst-frame record). */
export function closeMergeFrame(acc: MergeAccumulator, tally: MergeFrameTally): void {
  const n = acc.width * acc.height;
  const candidates = tally.candidates;
  if (acc.worst && candidates) keepOwnWings(candidates, acc.width, acc.height);
  if (acc.worst && candidates && candidates.count > 0) acc.worst = joinWorstRecords(acc.worst, candidates, candidates.count, 0, acc.frameWeight.length);
  tally.candidates = undefined;
  acc.frameWeight.push(tally.weightSum);
  acc.frameRejected.push(0);
  acc.frameConsidered.push(tally.considered);
  acc.frameContributing.push(tally.contributing / n);
  acc.frameWellExposed.push(tally.well / n);
}

export function addFrameToMerge(acc: MergeAccumulator, frame: MergeFrameInput): void {
  const n = acc.width * acc.height;
  if (frame.planes.length !== acc.channels) throw new ImagingError("size-mismatch", `merge expects ${acc.channels} planes, got ${frame.planes.length}`);
  if (frame.planes.some((p) => p.length !== n) || frame.clipped.length !== n) throw new ImagingError("size-mismatch", "merge inputs differ in size");
  const tally = createMergeTally();
  sampleScoreBand(acc, frame, 0, tally);
  addBandToMerge(acc, frame, 0, tally);
  closeMergeFrame(acc, tally);
}

/**
 * Joins partial merges of consecutive slices of one bracket's frames (parts in
 * frame order, each made by addFrameToMerge over its own slice, with the same
 * weighting and pilot) into the merge of the whole, so that slices can be merged
 * in separate processes. Sums, exposure weights and coverage add; the clipped
 * fallback is the largest; per pixel the worst frame is the one with the highest
 * score, the earlier frame on a tie, as one pass over all frames in order keeps
 * it. The per-frame records follow in order. The only difference from one pass
 * is the order of float additions (float32 sums: about 1e-7 relative). The first
 * part is reused for the result; the others are left as they are.
 */
export function combineMergeAccumulators(parts: MergeAccumulator[]): MergeAccumulator {
  if (parts.length === 0) throw new ImagingError("too-few-frames", "nothing to combine: no partial merges");
  const acc = parts[0];
  const n = acc.width * acc.height;
  for (const part of parts.slice(1)) {
    if (part.width !== acc.width || part.height !== acc.height || part.channels !== acc.channels || part.weighting !== acc.weighting) {
      throw new ImagingError("size-mismatch", "partial merges differ in size, planes or weighting");
    }
    if (Boolean(part.worst) !== Boolean(acc.worst)) throw new ImagingError("bad-parameter", "partial merges differ in pass: some have a pilot and some not");
    const firstFrame = acc.frameWeight.length;
    for (let c = 0; c < acc.sums.length; c++) {
      const into = acc.sums[c], from = part.sums[c];
      for (let i = 0; i < n; i++) into[i] += from[i];
    }
    for (let c = 0; c < acc.weights.length; c++) {
      const into = acc.weights[c], from = part.weights[c];
      for (let i = 0; i < n; i++) into[i] += from[i];
    }
    for (let i = 0; i < n; i++) {
      acc.coverage[i] += part.coverage[i];
      if (part.fallback[i] > acc.fallback[i]) acc.fallback[i] = part.fallback[i];
    }
    if (acc.worst && part.worst) acc.worst = joinWorstRecords(acc.worst, part.worst, part.worst.pixel.length, firstFrame);
    acc.frameWeight.push(...part.frameWeight);
    acc.frameContributing.push(...part.frameContributing);
    acc.frameWellExposed.push(...part.frameWellExposed);
    acc.frameRejected.push(...part.frameRejected);
    acc.frameConsidered.push(...part.frameConsidered);
  }
  return acc;
}

/**
 * The merge's result. It consumes the accumulator: each plane's sums become its
 * radiance in place (the same float32 values a fresh plane would get), and the
 * weights, fallback, pilot, worst-frame record and scratch are let go, so that
 * at 24 megapixels about 1.3 GB is free before the renditions start. The
 * accumulator keeps only its coverage (shared with the result) and per-frame records.
 */
export function finishMerge(acc: MergeAccumulator): MergeResult {
  const n = acc.width * acc.height;
  acc.pilot = undefined;
  if (acc.worst) removeOutliers(acc.worst, acc.weights[0], acc.sums, acc.coverage, acc.frameRejected);
  const radiance = acc.sums.map((sum, c) => {
    const weight = acc.weighting === "photon" ? acc.weights[0] : acc.weights[c];
    for (let i = 0; i < n; i++) {
      if (weight[i] > 0) sum[i] = acc.weighting === "photon" ? sum[i] / weight[i] : Math.exp(sum[i] / weight[i]);
      else sum[i] = acc.fallback[i];
    }
    return sum;
  });
  acc.sums = [];
  acc.weights = [];
  acc.fallback = new Float32Array(0);
  acc.pilot = undefined;
  acc.worst = undefined;
  acc.useScratch = undefined;
  let poorlyExposedCount = 0;
  for (let i = 0; i < n; i++) if (acc.coverage[i] === 0) poorlyExposedCount++;
  const total = acc.frameWeight.reduce((s, w) => s + w, 0);
  return {
    width: acc.width,
    height: acc.height,
    radiance,
    coverage: acc.coverage,
    poorlyExposedCount,
    frameStats: acc.frameWeight.map((w, k) => ({
      contributingFraction: acc.frameContributing[k],
      wellExposedFraction: acc.frameWellExposed[k],
      weightShare: total > 0 ? w / total : 0,
      rejectedFraction: acc.frameConsidered[k] > 0 ? acc.frameRejected[k] / acc.frameConsidered[k] : 0,
    })),
  };
}

/** Merges registered frames in one call (see createMergeAccumulator for large brackets). */
export function mergeFrames(
  frames: MergeFrameInput[],
  width: number,
  height: number,
  weighting: MergeWeighting = "photon",
  codeOf?: (linear: number) => number,
): MergeResult {
  if (frames.length === 0) throw new ImagingError("too-few-frames", "merge needs at least one frame");
  const acc = createMergeAccumulator(width, height, frames[0].planes.length, weighting, codeOf);
  for (const f of frames) addFrameToMerge(acc, f);
  return finishMerge(acc);
}

/**
 * Debevec and Malik (1997), eq. 6, on 8-bit codes of one channel:
 * ln E = sum w(Z_j) (g(Z_j) - ln t_j) / sum w(Z_j), with g = logResponse
 * (256 values) and weights `weightOf` (hat weights by default). A pixel where
 * every weight is zero gets NaN.
 */
export function mergeCodesDebevec(
  codes: ArrayLike<number>[],
  exposuresS: number[],
  logResponse: ArrayLike<number>,
  weightOf: (code: number) => number = computeHatWeight,
): Float32Array {
  if (codes.length !== exposuresS.length || codes.length === 0) {
    throw new ImagingError("bad-parameter", `need one exposure per frame: ${codes.length} frames, ${exposuresS.length} exposures`);
  }
  exposuresS.forEach((t, j) => {
    if (!(t > 0 && Number.isFinite(t))) throw new ImagingError("bad-exposure", `exposuresS[${j}] must be positive, got ${t}`);
  });
  if (logResponse.length !== 256) throw new ImagingError("bad-parameter", `response must have 256 entries, got ${logResponse.length}`);
  const n = codes[0].length;
  const out = new Float32Array(n);
  const logT = exposuresS.map(Math.log);
  for (let i = 0; i < n; i++) {
    let num = 0;
    let den = 0;
    for (let j = 0; j < codes.length; j++) {
      const z = codes[j][i];
      if (!(z >= 0 && z <= 255)) throw new ImagingError("bad-parameter", `frame ${j} holds code ${z} at pixel ${i}; 8-bit codes must be 0..255`);
      const w = weightOf(z);
      num += w * (logResponse[z] - logT[j]);
      den += w;
    }
    out[i] = den > 0 ? Math.exp(num / den) : NaN;
  }
  return out;
}

/**
 * The weighting of OpenCV's MergeDebevec (4.6, as Debian ships it), so results can
 * be compared with python3-opencv: triangle weights w(z) = z + 1 below 128 and
 * 256 - z above, response given as linear values (ln taken here).
 */
export function mergeCodesLikeOpenCv(codes: ArrayLike<number>[], exposuresS: number[], response: ArrayLike<number>): Float32Array {
  const logResponse = Float64Array.from(response, (v) => Math.log(v));
  return mergeCodesDebevec(codes, exposuresS, logResponse, computeOpenCvTriangleWeight);
}
