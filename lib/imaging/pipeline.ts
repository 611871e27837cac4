// The whole reduction of one bracket: linearize, mask, fit each limb, register,
// warp, merge, render. Per-frame stages are exported on their own so that a
// caller can run them in worker threads.
import { dilateMask } from "./blur";
import { ImagingError, requireNumberInRange } from "./errors";
import { fitLimb, type LimbFit } from "./limb-fit";
import { linearizeFrame, repairDefects, validateFrame, type LinearizedFrame } from "./linearize";
import { addFrameToMerge, createMergeAccumulator, finishMerge, toPilot, type FrameWeightStats, type MergeAccumulator, type MergeFrameInput, type MergeResult } from "./merge";
import { applyMgn, applyNrgf, blendWithGlobalImage, createValidMask, type LunarDisk } from "./radial";
import { estimateMoonTrack } from "./moon-track";
import { measureBracketLevels, type FrameLevels, type LevelSource } from "./frame-levels";
import { createStructureMask } from "./structure-noise";
import { registerFrames, type FrameRegistration, type RegistrationFrame } from "./register";
import { warpMask, warpPlanes, type WarpTarget } from "./resample";
import { convertResponseToTable, createCodeLookup, recoverResponseCurve, selectResponseSamples } from "./response";
import { applyAffine, composeAffine, fromAffine, type AffineSimilarity, type SimilarityTransform } from "./similarity";
import { computeLuminancePlane, createSrgbDecodeTable } from "./srgb";
import { computePercentiles, measureWhiteFraction, renderNatural, renderStructure } from "./tone";
import { DEFAULT_REDUCTION_PARAMS, FILTER_STRENGTH_RANGE, type BlackLevelSource, type FrameCount, type LinearFrame, type PlaneImage, type ProgressFn, type ReductionParams } from "./types";

export const PIPELINE_VERSION = "crownlight-imaging 0.2.0";

/** Master pixels this close to a lunar limb take light only from frames that agree on Moon or corona there. */
const LIMB_MARGIN_PX = 3;
/** Stands in for a plane the pipeline no longer needs. */
const RELEASED_PLANE = new Float32Array(0);

export interface FrameReport {
  name: string;
  width: number;
  height: number;
  exposureS: number;
  limb: LimbFit;
  /** Master to frame (see similarity.ts for the convention). */
  transform: SimilarityTransform;
  /** Phase correlation peak against the neighbour (NaN for the reference). */
  registrationPeak: number;
  /** The frame this one was registered against; null for the reference. */
  registeredAgainst: string | null;
  /** How the frame was placed: on the corona, or (when that failed, with `registrationNote`) by its limb alone. */
  registrationMethod: "reference" | "corona" | "limb";
  registrationNote?: string;
  /** The frame's offset (bias pedestal) in DN and where it came from; undefined for 8-bit frames. */
  offset?: { dn: number; source: BlackLevelSource; sigmaDn?: number; note?: string };
  /** Light the frame recorded against the others' (1 = as expected from its exposure), and the exposure the merge used. */
  transmission: number;
  effectiveExposureS: number;
  transmissionNote?: string;
  weights: FrameWeightStats;
}

/** A frame the reduction could not use, and why. */
export interface FrameLeftOut {
  name: string;
  reason: string;
}

export interface ReductionResult {
  /** Radiance in DN/s per plane (linear input) or relative light per second (8-bit input). */
  master: PlaneImage;
  coverage: Uint16Array;
  poorlyExposedCount: number;
  /** Display values 0..1, sRGB encoded, not yet quantized. */
  natural: PlaneImage;
  /** Display values 0..1 of the radial filter on the luminance (one plane). */
  structure: PlaneImage;
  frames: FrameReport[];
  /** Frames left out (no limb and no corona registration, say), with their reasons; the reduction went on without them. */
  leftOut: FrameLeftOut[];
  overall: {
    referenceFrame: string;
    /** The Moon at the reference frame's instant, master pixels (see moon-track.ts). */
    moonCentre: { x: number; y: number };
    moonRadiusPx: number;
    moonSource: "own-fit" | "path" | "own-doubtful-fit";
    /** Present when Moon-minus-Sun offsets were given for the reference frame. */
    sunCentre?: { x: number; y: number };
    /** Centre the radial filter used: the Sun's when known, else the Moon's. */
    filterCentre: { x: number; y: number };
    /** log2 of the 99.9th over the 0.1th percentile of well-exposed master luminance outside the Moon. */
    dynamicRangeStops: number;
    /** whiteFractionAtLimb: share of pixels from the lunar limb to 1.1 of its radius at full white in some plane (the inner corona burnt). */
    natural: { blackPoint: number; whitePoint: number; beta: number; whiteFractionAtLimb: number };
    timingsMs: Record<string, number>;
    pipelineVersion: string;
    parameters: ReductionParams;
  };
}

export interface ReduceOptions {
  /**
   * Called on every frame the pipeline prepares (or prepares again): returns the
   * frame to keep, which may hold its pixel data elsewhere (on disk, read back
   * through getters), so that memory does not grow with the number of frames.
   */
  keepPrepared?: (prepared: PreparedFrame) => PreparedFrame;
}

export interface PreparedFrame {
  /** Linearized frame; for linear input its planes are released after the limb fit (the merge warps the originals). */
  linear: LinearizedFrame;
  luminance: Float32Array;
  limb: LimbFit;
}

/**
 * A frame's light is corrected (its exposure scaled in the merge) when it differs
 * from what its exposure implies by more than this share and by more than four
 * times its own uncertainty. A thin cloud dims a frame by tens of per cent; the
 * measurement itself can be off by a few per cent where two frames overlap only
 * in a narrow band (measured: up to 5 % on noiseless brackets whose long frames
 * clip most of the field), so smaller differences, such as shutters a few per
 * cent off their marked times, are left as they are.
 */
export const TRANSMISSION_TOLERANCE = 0.1;
/** Below this transmission a frame is named as dimmed (a passing cloud, most often). */
const DIMMED_BELOW = 0.9;

/** Words for a frame's measured transmission, or undefined when it was taken as it is. */
function describeTransmission(tau: number): string | undefined {
  if (tau === 1) return undefined;
  const pct = Math.round(100 * tau);
  if (tau < DIMMED_BELOW) return `dimmed to ${pct} % of the light the other frames saw (a passing cloud, most likely): its exposure counts as ${pct} % and its weight is lowered to match`;
  return `recorded ${pct} % of the light its stated exposure implies (the shutter's real time differs): its exposure is corrected`;
}

/** Offsets and transmissions of linear frames, measured on the registered bracket (frame-levels.ts). */
function measureFrameLevels(frames: LinearFrame[], ready: PreparedFrame[], registration: FrameRegistration[], referenceLimb: LimbFit, width: number, height: number): FrameLevels {
  // Pixel data is read when a pair needs it (the prepared frames may keep it on disk), never all at once.
  const sources: LevelSource[] = ready.map((p, i) => ({
    width, height, masterToFrame: registration[i].masterToFrame, noiseSigma: p.linear.noiseSigma,
    get luminance() { return p.luminance; },
    get excluded() {
      const { clipped, masked } = p.linear;
      return masked ? Uint8Array.from(clipped, (c, k) => c | masked[k]) : clipped;
    },
  }));
  // Keep well clear of the Moon, which moves between frames, and of its limb light.
  const moon = { x: referenceLimb.x, y: referenceLimb.y, radiusPx: 1.06 * referenceLimb.radiusPx + 4 };
  const levelFrames = frames.map((f) => ({ exposureS: f.exposureS, isOffsetKnown: f.blackLevelSource === "calibrated" || f.blackLevelSource === "file" }));
  // Frames the registration could not place are left out of the measurement (they are left out of the merge too).
  const placed = registration.map((r) => r.method !== "failed");
  const result = measureBracketLevels(sources.map((src, i) => (placed[i] ? src : { ...src, luminance: new Float32Array(0), excluded: new Uint8Array(width * height).fill(1) })), levelFrames, width, height, moon);
  return result;
}

/** Refuses a bracket that cannot be reduced, naming the frame at fault. */
export function validateBracket(frames: LinearFrame[]): void {
  if (!Array.isArray(frames) || frames.length < 2) {
    throw new ImagingError("too-few-frames", `a bracket needs at least 2 frames, got ${Array.isArray(frames) ? frames.length : 0}`);
  }
  const first = frames[0];
  for (const f of frames) {
    validateFrame(f);
    if (f.image.width !== first.image.width || f.image.height !== first.image.height) {
      throw new ImagingError("size-mismatch", `is ${f.image.width} x ${f.image.height} but ${first.name} is ${first.image.width} x ${first.image.height}`, f.name);
    }
    if (f.image.planes.length !== first.image.planes.length) {
      throw new ImagingError("size-mismatch", `has ${f.image.planes.length} colour planes but ${first.name} has ${first.image.planes.length}`, f.name);
    }
    if (f.encoding !== first.encoding) throw new ImagingError("bad-parameter", `is ${f.encoding} but ${first.name} is ${first.encoding}; a bracket must be all one kind`, f.name);
  }
}

/**
 * Camera response of an 8-bit bracket (Debevec and Malik 1997) from the green
 * (or only) plane, as a 256-entry linear table. Debevec and Malik assume
 * registered frames: pass the master-to-frame maps (and the Moon, whose edge
 * moves between frames and is kept out of the samples) once registration has run.
 */
export function recoverBracketResponse(frames: LinearFrame[], masterToFrame?: AffineSimilarity[], moon?: LunarDisk): Float64Array {
  const plane = frames[0].image.planes.length === 3 ? 1 : 0;
  const { width, height } = frames[0].image;
  const order = frames.map((_, i) => i).sort((a, b) => frames[a].exposureS - frames[b].exposureS);
  const codes = frames.map((f, i) => {
    const m = masterToFrame?.[i];
    if (!m || (m.a === 1 && m.b === 0 && m.tx === 0 && m.ty === 0)) return f.image.planes[plane];
    const warped = warpPlanes([f.image.planes[plane]], width, height, m, { width, height }, "bilinear").planes[0];
    for (let k = 0; k < warped.length; k++) warped[k] = Math.round(warped[k]);
    return warped;
  });
  const middle = order[Math.floor(order.length / 2)];
  let reference = codes[middle];
  if (moon) {
    // Code 0 is never sampled: blank out the Moon and a band around its moving edge.
    reference = Float32Array.from(reference);
    const r = moon.radiusPx + 12;
    for (let y = Math.max(0, Math.floor(moon.y - r)); y <= Math.min(height - 1, Math.ceil(moon.y + r)); y++) {
      for (let x = Math.max(0, Math.floor(moon.x - r)); x <= Math.min(width - 1, Math.ceil(moon.x + r)); x++) {
        if ((x - moon.x) ** 2 + (y - moon.y) ** 2 < r * r) reference[y * width + x] = 0;
      }
    }
  }
  const samples = selectResponseSamples(reference, width, height, 70);
  const g = recoverResponseCurve(codes, frames.map((f) => f.exposureS), samples, 10);
  return convertResponseToTable(g);
}

/**
 * Per-frame stage: linearize, mask and fit the limb. A limb that cannot be found
 * (a long exposure saturated far beyond it, say) comes back with verdict
 * "failed": the frame may still register on the corona.
 */
export function prepareFrame(frame: LinearFrame, params: ReductionParams, responseTable?: Float64Array): PreparedFrame {
  const linear = linearizeFrame(frame, params.clipFraction, { responseTable, keepPlanes: frame.encoding !== "linear" });
  const luminance = linear.luminance;
  const limb = fitLimb(luminance, linear.width, linear.height, { clipLevel: linear.clipLevel, clipped: linear.clipped, noiseSigma: linear.noiseSigma });
  return { linear, luminance, limb };
}

/**
 * Per-frame stage: the frame warped into master pixels as merge input. A master
 * pixel near either lunar limb is used only when this frame and the reference
 * agree on whether the Moon covers it (the Moon moves between frames).
 */
export function warpFrameForMerge(
  frame: LinearFrame,
  prepared: PreparedFrame,
  masterToFrame: AffineSimilarity,
  frameMoon: LunarDisk,
  referenceMoon: LunarDisk,
  scratch?: WarpTarget,
  effectiveExposureS?: number,
): MergeFrameInput {
  const { linear } = prepared;
  const { width, height } = linear;
  const window = { width, height };
  const identity = masterToFrame.a === 1 && masterToFrame.b === 0 && masterToFrame.tx === 0 && masterToFrame.ty === 0;
  const isLinear = frame.encoding === "linear";
  // A defect's own value never reaches the master: the warp reads it as the median of its sound
  // neighbours (so the bicubic support of the pixels around it is not spoilt), and the master
  // pixel that lands on it is masked. Only where every frame's defect lands is a master pixel empty.
  const raw = isLinear ? frame.image.planes : linear.planes;
  const source = linear.masked ? raw.map((p) => repairDefects(p, linear.masked!, width, height)) : raw;
  let planes: Float32Array[];
  let covered: Uint8Array;
  let clipped = linear.clipped;
  let noiseFloor = linear.noiseFloor;
  let masked = linear.masked;
  if (identity) {
    planes = isLinear ? source.map((p, c) => (scratch ? (scratch.planes[c].set(p), scratch.planes[c]) : Float32Array.from(p))) : source;
    covered = scratch ? scratch.covered.fill(1) : new Uint8Array(width * height).fill(1);
  } else {
    const warped = warpPlanes(source, width, height, masterToFrame, window, "bicubic", scratch);
    planes = warped.planes;
    covered = warped.covered;
    // Bicubic reaches two pixels: widen the clipped mask by one more before sampling it.
    // With scratch, the four mask buffers are reused frame after frame (the merge reads them before the next warp).
    const masks = scratch?.masks?.length === 4 ? scratch.masks : undefined;
    const dilated = dilateMask(linear.clipped, width, height, 1, masks ? [masks[0], masks[1]] : undefined);
    clipped = warpMask(dilated, width, height, masterToFrame, window, 1, masks?.[2]);
    noiseFloor = warpMask(linear.noiseFloor, width, height, masterToFrame, window, 1, masks?.[3]);
    if (masked) masked = warpMask(masked, width, height, masterToFrame, window, 0);
  }
  if (isLinear) {
    const black = frame.blackLevel;
    for (const p of planes) for (let i = 0; i < p.length; i++) p[i] -= black;
  }
  const moon = frameMoon;
  const moonR = frameMoon.radiusPx;
  const reach = Math.max(moonR, referenceMoon.radiusPx) + LIMB_MARGIN_PX + Math.hypot(moon.x - referenceMoon.x, moon.y - referenceMoon.y);
  const y0 = Math.max(0, Math.floor(referenceMoon.y - reach));
  const y1 = Math.min(height - 1, Math.ceil(referenceMoon.y + reach));
  const x0 = Math.max(0, Math.floor(referenceMoon.x - reach));
  const x1 = Math.min(width - 1, Math.ceil(referenceMoon.x + reach));
  if (!identity) {
    for (let y = y0; y <= y1; y++) {
      for (let x = x0; x <= x1; x++) {
        const dFrame = Math.hypot(x - moon.x, y - moon.y) - moonR;
        const dRef = Math.hypot(x - referenceMoon.x, y - referenceMoon.y) - referenceMoon.radiusPx;
        const agree = (dFrame > LIMB_MARGIN_PX && dRef > LIMB_MARGIN_PX) || (dFrame < -LIMB_MARGIN_PX && dRef < -LIMB_MARGIN_PX);
        if (!agree) covered[y * width + x] = 0;
      }
    }
  }
  return { planes, exposureS: effectiveExposureS ?? linear.exposureS, clipped, noiseFloor, covered, clipLevel: linear.clipLevel, masked, noiseSigma: linear.noiseSigma };
}

/** Master pixels no frame gave any light to (coverage 0 and radiance exactly 0: every frame masked there); undefined when none. */
function findEmptyPixels(merged: MergeResult): Uint8Array | undefined {
  const n = merged.width * merged.height;
  let holes: Uint8Array | undefined;
  for (let i = 0; i < n; i++) {
    if (merged.coverage[i] !== 0 || merged.radiance.some((p) => p[i] !== 0)) continue;
    holes ??= new Uint8Array(n);
    holes[i] = 1;
  }
  return holes;
}

/** log2 of the 99.9th over the 0.1th percentile of positive, well-exposed luminance outside the Moon. */
export function measureDynamicRangeStops(lum: Float32Array, width: number, height: number, coverage: Uint16Array, moon: LunarDisk): number {
  const valid = createValidMask(width, height, { ...moon, radiusPx: moon.radiusPx + LIMB_MARGIN_PX });
  for (let i = 0; i < lum.length; i++) if (!coverage[i] || !(lum[i] > 0)) valid[i] = 0;
  const [lo, hi] = computePercentiles(lum, [0.1, 99.9], valid);
  return lo > 0 && hi > lo ? Math.log2(hi / lo) : 0;
}

/**
 * Reduces a bracket to a master and its renditions. Throws ImagingError for
 * fewer than two frames, frames of different sizes, a frame without a positive
 * finite exposure, and a frame whose limb cannot be found.
 */
export function reduceBracket(frames: LinearFrame[], params: ReductionParams, onProgress?: ProgressFn): ReductionResult {
  return reducePreparedBracket(frames, [], params, onProgress);
}

/**
 * reduceBracket for a caller that has already run prepareFrame on some frames
 * (e.g. in worker threads): `prepared[i]`, when present, must be
 * prepareFrame(frames[i], params) with the sRGB decode table for 8-bit frames;
 * missing entries are prepared here. The result is the same as reduceBracket's.
 * Each prepared frame's luminance is released once registration is done.
 */
export function reducePreparedBracket(frames: LinearFrame[], prepared: readonly (PreparedFrame | undefined)[], params: ReductionParams, onProgress?: ProgressFn, options: ReduceOptions = {}): ReductionResult {
  const keepFrame = options.keepPrepared ?? ((p: PreparedFrame) => p);
  const timingsMs: Record<string, number> = {};
  let clock = performance.now();
  const lap = (stage: string) => {
    const now = performance.now();
    timingsMs[stage] = (timingsMs[stage] ?? 0) + (now - clock);
    clock = now;
  };
  const progress = (stage: string, fraction: number, count?: FrameCount) => onProgress?.(stage, fraction, count);
  validateBracket(frames);
  if (!(params.clipFraction > 0 && params.clipFraction <= 1)) throw new ImagingError("bad-parameter", `clipFraction must be in (0, 1], got ${params.clipFraction}`);
  if (params.filter !== "mgn" && params.filter !== "nrgf") throw new ImagingError("bad-parameter", `filter must be "mgn" or "nrgf", got ${String(params.filter)}`);
  if (params.registration !== "moon" && params.registration !== "corona") throw new ImagingError("bad-parameter", `registration must be "moon" or "corona", got ${String(params.registration)}`);
  const filterStrength = params.filterStrength ?? DEFAULT_REDUCTION_PARAMS.filterStrength!;
  requireNumberInRange("filterStrength", filterStrength, FILTER_STRENGTH_RANGE.min, FILTER_STRENGTH_RANGE.max);
  const { width, height } = frames[0].image;
  const isEncoded = frames[0].encoding === "srgb8";

  progress("linearize", 0);
  // 8-bit frames are linearized with the sRGB curve for limb fits and registration; a
  // recovered response, when asked for, replaces it for the merge (see below).
  let responseTable = isEncoded ? createSrgbDecodeTable() : undefined;
  const work: LinearFrame[] = frames.slice();
  const ready: PreparedFrame[] = [];
  work.forEach((f, i) => {
    ready.push(prepared[i] ?? keepFrame(prepareFrame(f, params, responseTable)));
    progress("limb", (i + 1) / frames.length, { done: i + 1, total: frames.length });
  });
  lap("linearize-and-limb");

  progress("register", 0);
  const offsets = params.moonMinusSunPx;
  const toRegistration = (p: PreparedFrame): RegistrationFrame => ({
    name: p.linear.name, width, height, exposureS: p.linear.exposureS,
    get luminance() { return p.luminance; },
    get clipped() { return p.linear.clipped; },
    noiseSigma: p.linear.noiseSigma, moonMinusSunPx: offsets?.[p.linear.name],
    limb: p.limb.verdict === "failed" ? { x: NaN, y: NaN, radiusPx: NaN } : { x: p.limb.x, y: p.limb.y, radiusPx: p.limb.radiusPx },
  });
  // Always register on the corona; "moon" mode then moves each frame so that its
  // Moon (or, with offsets, its ephemeris Sun) lands on the reference's, using
  // the Moon path rather than limb fits that clipping has biased.
  let registration = registerFrames(ready.map(toRegistration), { mode: "corona" });
  lap("register");

  // Offsets and transmissions from the bracket itself (frame-levels.ts); an offset
  // found in the data changes the frame's counts, masks and log images, so the
  // frames are registered again on the corrected light.
  let levels: FrameLevels | undefined;
  const transmissionUsed = work.map(() => 1);
  if (!isEncoded) {
    progress("levels", 0);
    levels = measureFrameLevels(work, ready, registration.frames, ready[registration.referenceIndex].limb, width, height);
    let moved = false;
    work.forEach((f, i) => {
      const source = f.blackLevelSource ?? "none";
      if ((source === "none" || source === "solved") && !levels!.undetermined.includes(i)) {
        const o = levels!.offsets[i];
        // A DN count cannot sit below zero: a solved residual a hair under it is noise about a data set already at zero.
        work[i] = { ...f, blackLevel: Math.max(0, f.blackLevel + o), blackLevelSource: "solved" };
        const linear = linearizeFrame(work[i], params.clipFraction, { keepPlanes: false });
        ready[i] = keepFrame({ linear, luminance: linear.luminance, limb: ready[i].limb });
        if (Math.abs(o) > 3 * Math.max(ready[i].linear.noiseSigma, 1e-9)) moved = true;
      }
      const tau = levels!.transmissions[i];
      const sigma = levels!.transmissionSigmas[i];
      if (Number.isFinite(tau) && Math.abs(tau - 1) > Math.max(TRANSMISSION_TOLERANCE, 4 * (Number.isFinite(sigma) ? sigma : Infinity))) transmissionUsed[i] = tau;
    });
    lap("levels");
    if (moved) {
      registration = registerFrames(ready.map(toRegistration), { mode: "corona" });
      lap("register");
    }
  }

  // Frames that neither the corona nor their limb could place are left out, named; the rest go on.
  const leftOut: FrameLeftOut[] = [];
  const keep: number[] = [];
  registration.frames.forEach((r, i) => {
    if (r.method === "failed") leftOut.push({ name: frames[i].name, reason: r.reason ?? "it could not be registered" });
    else keep.push(i);
  });
  if (keep.length < 2) {
    throw new ImagingError("too-few-frames", `only ${keep.length} frame could be placed on the Sun: ${leftOut.map((l) => `${l.name}: ${l.reason}`).join("; ")}`);
  }
  const pickKept = <T,>(list: T[]) => keep.map((i) => list[i]);
  const usedFrames = pickKept(work);
  const usedReady = pickKept(ready);
  const usedRegistration: FrameRegistration[] = pickKept(registration.frames);
  const usedTransmission = pickKept(transmissionUsed);
  const ref = keep.indexOf(registration.referenceIndex);

  let track = estimateMoonTrack(usedReady.map((p, i) => ({
    limb: p.limb, masterToFrame: usedRegistration[i].masterToFrame, captureTimeMs: usedFrames[i].captureTimeMs, exposureS: p.linear.exposureS,
  })));
  if (params.registration === "moon") {
    const anchor = (i: number) => {
      const off = offsets?.[usedFrames[i].name] ?? { dx: 0, dy: 0 };
      return { x: track.disks[i].x - off.dx, y: track.disks[i].y - off.dy };
    };
    const refAnchor = anchor(ref);
    usedRegistration.forEach((r, i) => {
      const a = anchor(i);
      r.masterToFrame = composeAffine(r.masterToFrame, { a: 1, b: 0, tx: a.x - refAnchor.x, ty: a.y - refAnchor.y });
    });
    // Every anchor now sits on the reference's, so each frame's Moon is the reference anchor plus its own offset.
    track = {
      disks: usedFrames.map((f, i) => {
        const off = offsets?.[f.name] ?? { dx: 0, dy: 0 };
        return { x: refAnchor.x + off.dx, y: refAnchor.y + off.dy, radiusPx: track.disks[i].radiusPx };
      }),
      sources: track.sources,
    };
  }
  lap("register");
  // Luminance served the limb fits, levels and registration only: letting each frame's copy
  // go here keeps a bracket's worth of it from sitting beside the merge buffers.
  for (const p of ready) {
    p.luminance = RELEASED_PLANE;
    p.linear.luminance = RELEASED_PLANE;
  }

  const referenceMoon: LunarDisk = track.disks[ref];
  if (isEncoded && params.recoverResponse) {
    progress("response", 0);
    responseTable = recoverBracketResponse(usedFrames, usedRegistration.map((r) => r.masterToFrame), referenceMoon);
    usedReady.forEach((p, i) => {
      const linear = linearizeFrame(usedFrames[i], params.clipFraction, { responseTable });
      usedReady[i] = keepFrame({ linear, luminance: RELEASED_PLANE, limb: p.limb });
    });
    lap("response");
  }
  // One set of warp buffers serves every frame in turn.
  const scratch: WarpTarget = {
    planes: frames[0].image.planes.map(() => new Float32Array(width * height)),
    covered: new Uint8Array(width * height),
    masks: Array.from({ length: 4 }, () => new Uint8Array(width * height)),
  };
  const channels = frames[0].image.planes.length;
  const effectiveExposures = usedReady.map((p, i) => p.linear.exposureS * usedTransmission[i]);
  const mergePass = (acc: MergeAccumulator, stage: string) => {
    usedReady.forEach((p, i) => {
      addFrameToMerge(acc, warpFrameForMerge(usedFrames[i], p, usedRegistration[i].masterToFrame, track.disks[i], referenceMoon, scratch, effectiveExposures[i]));
      progress(stage, (i + 1) / usedReady.length, { done: i + 1, total: usedReady.length });
    });
    return acc;
  };
  let acc: MergeAccumulator;
  if (isEncoded) {
    acc = mergePass(createMergeAccumulator(width, height, channels, "debevec-hat", createCodeLookup(responseTable!)), "merge");
  } else {
    // Linear data: a first pass gives the pilot radiance; the second weighs by it and rejects outliers against it.
    const pilot = mergePass(createMergeAccumulator(width, height, channels, "photon"), "merge-pilot");
    acc = mergePass(createMergeAccumulator(width, height, channels, "photon", undefined, toPilot(pilot)), "merge");
  }
  const merged: MergeResult = finishMerge(acc);
  const master: PlaneImage = { width, height, planes: merged.radiance };
  lap("warp-and-merge");
  // The master keeps its empty pixels (every frame's defect there); the renditions show them
  // filled from their neighbours, so that a masked defect is not a black dot in the picture.
  const holes = findEmptyPixels(merged);
  const shown: PlaneImage = holes ? { width, height, planes: master.planes.map((p) => repairDefects(p, holes, width, height)) } : master;

  progress("renditions", 0);
  const refOffset = offsets?.[usedFrames[ref].name];
  const sunCentre = refOffset ? { x: referenceMoon.x - refOffset.dx, y: referenceMoon.y - refOffset.dy } : undefined;
  const filterCentre = sunCentre ?? { x: referenceMoon.x, y: referenceMoon.y };
  const outsideMoon = createValidMask(width, height, referenceMoon);
  const luminance = computeLuminancePlane(shown.planes);
  // White point at the top of the inner corona: the ring from the lunar limb to about 1.1 solar radii.
  const limbRing = { x: referenceMoon.x, y: referenceMoon.y, innerPx: referenceMoon.radiusPx, outerPx: 1.1 * referenceMoon.radiusPx };
  const natural = renderNatural(shown, { valid: outsideMoon, luminance, limbRing });
  const filterDisk = { ...referenceMoon, radiusPx: referenceMoon.radiusPx + 1 };
  // Uncovered pixels and the canvas edge are masked, not enhanced. Along the edge, master pixels
  // within the largest frame displacement (plus the bicubic reach of 2 px) miss some frames.
  let reachPx = 0;
  for (const r of usedRegistration) {
    for (const [x, y] of [[0, 0], [width - 1, 0], [0, height - 1], [width - 1, height - 1]]) {
      const p = applyAffine(r.masterToFrame, x, y);
      reachPx = Math.max(reachPx, Math.hypot(p.x - x, p.y - y));
    }
  }
  const edgeBandPx = Math.min(Math.ceil(reachPx) + 2, Math.floor(Math.min(width, height) / 4));
  const structureMask = createStructureMask(width, height, merged.coverage, { lunarDisk: filterDisk, edgeBandPx });
  // The strength weighs local structure against the overall image: MGN's h is its complement.
  const filtered = params.filter === "mgn"
    ? applyMgn(luminance, width, height, { lunarDisk: filterDisk, valid: structureMask, h: 1 - filterStrength })
    : blendWithGlobalImage(applyNrgf(luminance, width, height, { sunCentre: filterCentre, lunarDisk: filterDisk, valid: structureMask }), luminance, filterStrength);
  const structure = renderStructure(filtered, width, height);
  const dynamicRangeStops = measureDynamicRangeStops(luminance, width, height, merged.coverage, referenceMoon);
  progress("renditions", 1);
  lap("renditions");

  return {
    master,
    coverage: merged.coverage,
    poorlyExposedCount: merged.poorlyExposedCount,
    natural: natural.image,
    structure,
    frames: usedReady.map((p, i) => {
      const k = keep[i];
      const r = usedRegistration[i];
      const source = work[k].blackLevelSource ?? (isEncoded ? undefined : "none");
      const undetermined = levels?.undetermined.includes(k) ?? false;
      const tau = usedTransmission[i];
      return {
        name: p.linear.name, width, height, exposureS: p.linear.exposureS, limb: p.limb,
        transform: fromAffine(r.masterToFrame, width, height),
        registrationPeak: r.peak,
        registeredAgainst: r.neighbour >= 0 ? frames[r.neighbour].name : null,
        registrationMethod: r.method === "failed" ? "limb" : r.method,
        registrationNote: r.method === "limb" ? `placed by its limb fit alone: ${r.reason}` : undefined,
        offset: isEncoded ? undefined : {
          dn: work[k].blackLevel,
          source: source!,
          sigmaDn: source === "solved" && levels ? levels.offsetSigmas[k] : undefined,
          note: undetermined && source === "none" ? "its offset could not be determined: no other frame sees enough of the same sky well; taken as zero" : undefined,
        },
        transmission: tau,
        effectiveExposureS: effectiveExposures[i],
        transmissionNote: describeTransmission(tau),
        weights: merged.frameStats[i],
      };
    }),
    leftOut,
    overall: {
      referenceFrame: usedFrames[ref].name,
      moonCentre: { x: referenceMoon.x, y: referenceMoon.y },
      moonRadiusPx: referenceMoon.radiusPx,
      moonSource: track.sources[ref],
      sunCentre,
      filterCentre,
      dynamicRangeStops,
      natural: { blackPoint: natural.blackPoint, whitePoint: natural.whitePoint, beta: natural.beta, whiteFractionAtLimb: measureWhiteFraction(natural.image, limbRing, undefined, outsideMoon) },
      timingsMs,
      pipelineVersion: PIPELINE_VERSION,
      parameters: params,
    },
  };
}
