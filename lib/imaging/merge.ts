// HDR merge of registered frames.
//  - Linear data: photon-limited inverse-variance weighting. With counts
//    y_i ~ Poisson(E t_i) the maximum-likelihood radiance is E = sum y_i / sum t_i
//    over the frames not clipped at the pixel (Granados et al. 2010, CVPR,
//    "Optimal HDR reconstruction with linear digital cameras", from memory: the
//    read-noise-free limit of their weights).
//  - 8-bit data: Debevec and Malik (1997), SIGGRAPH, eq. 6:
//    ln E = sum w(Z_j) (g(Z_j) - ln t_j) / sum w(Z_j), hat weights w.
import { ImagingError } from "./errors";

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
}

export interface FrameWeightStats {
  /** Master pixels where the frame contributed (covered, unclipped), fraction. */
  contributingFraction: number;
  /** Master pixels where the frame was well exposed (contributed and above the noise floor), fraction. */
  wellExposedFraction: number;
  /** The frame's share of all merge weight in the master. */
  weightShare: number;
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
  /** Per-frame mask of contributing pixels, reused by every frame (fresh pages are costly to fault in). */
  useScratch?: Uint8Array;
}

export function createMergeAccumulator(
  width: number,
  height: number,
  channels: number,
  weighting: MergeWeighting,
  codeOf?: (linear: number) => number,
): MergeAccumulator {
  if (weighting === "debevec-hat" && !codeOf) throw new ImagingError("bad-parameter", "debevec-hat merge needs a map from linear value to 8-bit code");
  const n = width * height;
  const weightPlanes = weighting === "photon" ? 1 : channels;
  return {
    width, height, channels, weighting,
    sums: Array.from({ length: channels }, () => new Float32Array(n)),
    weights: Array.from({ length: weightPlanes }, () => new Float64Array(n)),
    fallback: new Float32Array(n),
    coverage: new Uint16Array(n),
    frameWeight: [], frameContributing: [], frameWellExposed: [], codeOf,
  };
}

export function addFrameToMerge(acc: MergeAccumulator, frame: MergeFrameInput): void {
  const n = acc.width * acc.height;
  if (frame.planes.length !== acc.channels) throw new ImagingError("size-mismatch", `merge expects ${acc.channels} planes, got ${frame.planes.length}`);
  if (frame.planes.some((p) => p.length !== n) || frame.clipped.length !== n) throw new ImagingError("size-mismatch", "merge inputs differ in size");
  const t = frame.exposureS;
  const bound = frame.clipLevel / t;
  const { clipped, noiseFloor, covered } = frame;
  const { coverage, fallback } = acc;
  let weightSum = 0;
  let contributing = 0;
  let well = 0;
  // Pass 1: masks, coverage and the clipped fallback (shared by every plane).
  const use = acc.useScratch?.length === n ? acc.useScratch.fill(0) : (acc.useScratch = new Uint8Array(n));
  for (let i = 0; i < n; i++) {
    if (covered && !covered[i]) continue;
    if (clipped[i]) {
      if (bound > fallback[i]) fallback[i] = bound;
      continue;
    }
    use[i] = 1;
    contributing++;
    if (!noiseFloor[i]) {
      coverage[i]++;
      well++;
    }
  }
  // Pass 2: one tight loop per plane.
  if (acc.weighting === "photon") {
    const exposure = acc.weights[0];
    for (let i = 0; i < n; i++) if (use[i]) exposure[i] += t;
    weightSum = t * contributing;
    for (let c = 0; c < acc.channels; c++) {
      const sum = acc.sums[c];
      const p = frame.planes[c];
      for (let i = 0; i < n; i++) if (use[i]) sum[i] += p[i];
    }
  } else {
    const logT = Math.log(t);
    const codeOf = acc.codeOf!;
    for (let c = 0; c < acc.channels; c++) {
      const sum = acc.sums[c];
      const weight = acc.weights[c];
      const p = frame.planes[c];
      for (let i = 0; i < n; i++) {
        if (!use[i]) continue;
        const v = p[i];
        if (!(v > 0)) continue;
        const w = computeHatWeight(codeOf(v));
        if (w <= 0) continue;
        sum[i] += w * (Math.log(v) - logT);
        weight[i] += w;
        weightSum += w / acc.channels;
      }
    }
  }
  acc.frameWeight.push(weightSum);
  acc.frameContributing.push(contributing / n);
  acc.frameWellExposed.push(well / n);
}

export function finishMerge(acc: MergeAccumulator): MergeResult {
  const n = acc.width * acc.height;
  const radiance = acc.sums.map((sum, c) => {
    const out = new Float32Array(n);
    const weight = acc.weighting === "photon" ? acc.weights[0] : acc.weights[c];
    for (let i = 0; i < n; i++) {
      if (weight[i] > 0) out[i] = acc.weighting === "photon" ? sum[i] / weight[i] : Math.exp(sum[i] / weight[i]);
      else out[i] = acc.fallback[i];
    }
    return out;
  });
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
