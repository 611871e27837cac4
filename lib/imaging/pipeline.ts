// The whole reduction of one bracket: linearize, mask, fit each limb, register,
// warp, merge, render. Per-frame stages are exported on their own so that a
// caller can run them in worker threads.
import { dilateMask } from "./blur";
import { ImagingError, requireNumberInRange } from "./errors";
import { fitLimb, type LimbFit } from "./limb-fit";
import { linearizeFrame, validateFrame, type LinearizedFrame } from "./linearize";
import { addFrameToMerge, createMergeAccumulator, finishMerge, type FrameWeightStats, type MergeFrameInput, type MergeResult } from "./merge";
import { applyMgn, applyNrgf, blendWithGlobalImage, createValidMask, type LunarDisk } from "./radial";
import { estimateMoonTrack } from "./moon-track";
import { createStructureMask } from "./structure-noise";
import { registerFrames, type RegistrationFrame } from "./register";
import { warpMask, warpPlanes, type WarpTarget } from "./resample";
import { convertResponseToTable, createCodeLookup, recoverResponseCurve, selectResponseSamples } from "./response";
import { applyAffine, composeAffine, fromAffine, type AffineSimilarity, type SimilarityTransform } from "./similarity";
import { computeLuminancePlane, createSrgbDecodeTable } from "./srgb";
import { computePercentiles, renderNatural, renderStructure } from "./tone";
import { DEFAULT_REDUCTION_PARAMS, FILTER_STRENGTH_RANGE, type LinearFrame, type PlaneImage, type ProgressFn, type ReductionParams } from "./types";

export const PIPELINE_VERSION = "crownlight-imaging 0.1.0";

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
  weights: FrameWeightStats;
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
    natural: { blackPoint: number; whitePoint: number; beta: number };
    timingsMs: Record<string, number>;
    pipelineVersion: string;
    parameters: ReductionParams;
  };
}

export interface PreparedFrame {
  /** Linearized frame; for linear input its planes are released after the limb fit (the merge warps the originals). */
  linear: LinearizedFrame;
  luminance: Float32Array;
  limb: LimbFit;
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

/** Per-frame stage: linearize, mask and fit the limb. Throws limb-not-found naming the frame. */
export function prepareFrame(frame: LinearFrame, params: ReductionParams, responseTable?: Float64Array): PreparedFrame {
  const linear = linearizeFrame(frame, params.clipFraction, { responseTable, keepPlanes: frame.encoding !== "linear" });
  const luminance = linear.luminance;
  const limb = fitLimb(luminance, linear.width, linear.height, { clipLevel: linear.clipLevel, clipped: linear.clipped, noiseSigma: linear.noiseSigma });
  if (limb.verdict === "failed") throw new ImagingError("limb-not-found", `the lunar limb could not be found: ${limb.reasons.join("; ")}`, frame.name);
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
): MergeFrameInput {
  const { linear } = prepared;
  const { width, height } = linear;
  const window = { width, height };
  const identity = masterToFrame.a === 1 && masterToFrame.b === 0 && masterToFrame.tx === 0 && masterToFrame.ty === 0;
  const isLinear = frame.encoding === "linear";
  const source = isLinear ? frame.image.planes : linear.planes;
  let planes: Float32Array[];
  let covered: Uint8Array;
  let clipped = linear.clipped;
  let noiseFloor = linear.noiseFloor;
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
  return { planes, exposureS: linear.exposureS, clipped, noiseFloor, covered, clipLevel: linear.clipLevel };
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
export function reducePreparedBracket(frames: LinearFrame[], prepared: readonly (PreparedFrame | undefined)[], params: ReductionParams, onProgress?: ProgressFn): ReductionResult {
  const timingsMs: Record<string, number> = {};
  let clock = performance.now();
  const lap = (stage: string) => {
    const now = performance.now();
    timingsMs[stage] = (timingsMs[stage] ?? 0) + (now - clock);
    clock = now;
  };
  const progress = (stage: string, fraction: number) => onProgress?.(stage, fraction);
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
  const ready: PreparedFrame[] = [];
  frames.forEach((f, i) => {
    ready.push(prepared[i] ?? prepareFrame(f, params, responseTable));
    progress("limb", (i + 1) / frames.length);
  });
  lap("linearize-and-limb");

  progress("register", 0);
  const offsets = params.moonMinusSunPx;
  const regFrames: RegistrationFrame[] = ready.map((p) => ({
    name: p.linear.name, width, height, exposureS: p.linear.exposureS, luminance: p.luminance, clipped: p.linear.clipped,
    noiseSigma: p.linear.noiseSigma, limb: { x: p.limb.x, y: p.limb.y, radiusPx: p.limb.radiusPx }, moonMinusSunPx: offsets?.[p.linear.name],
  }));
  // Always register on the corona; "moon" mode then moves each frame so that its
  // Moon (or, with offsets, its ephemeris Sun) lands on the reference's, using
  // the Moon path rather than limb fits that clipping has biased.
  const registration = registerFrames(regFrames, { mode: "corona" });
  const ref = registration.referenceIndex;
  let track = estimateMoonTrack(ready.map((p, i) => ({
    limb: p.limb, masterToFrame: registration.frames[i].masterToFrame, captureTimeMs: frames[i].captureTimeMs, exposureS: p.linear.exposureS,
  })));
  if (params.registration === "moon") {
    const anchor = (i: number) => {
      const off = offsets?.[frames[i].name] ?? { dx: 0, dy: 0 };
      return { x: track.disks[i].x - off.dx, y: track.disks[i].y - off.dy };
    };
    const refAnchor = anchor(ref);
    registration.frames.forEach((r, i) => {
      const a = anchor(i);
      r.masterToFrame = composeAffine(r.masterToFrame, { a: 1, b: 0, tx: a.x - refAnchor.x, ty: a.y - refAnchor.y });
    });
    // Every anchor now sits on the reference's, so each frame's Moon is the reference anchor plus its own offset.
    track = {
      disks: frames.map((f, i) => {
        const off = offsets?.[f.name] ?? { dx: 0, dy: 0 };
        return { x: refAnchor.x + off.dx, y: refAnchor.y + off.dy, radiusPx: track.disks[i].radiusPx };
      }),
      sources: track.sources,
    };
  }
  lap("register");
  // Luminance served the limb fits and registration only: letting each frame's copy
  // go here keeps a bracket's worth of it from sitting beside the merge buffers.
  regFrames.length = 0;
  for (const p of ready) {
    p.luminance = RELEASED_PLANE;
    p.linear.luminance = RELEASED_PLANE;
  }

  const referenceMoon: LunarDisk = track.disks[ref];
  if (isEncoded && params.recoverResponse) {
    progress("response", 0);
    responseTable = recoverBracketResponse(frames, registration.frames.map((r) => r.masterToFrame), referenceMoon);
    ready.forEach((p, i) => {
      p.linear = linearizeFrame(frames[i], params.clipFraction, { responseTable });
    });
    lap("response");
  }
  // One set of warp buffers serves every frame in turn.
  const scratch: WarpTarget = {
    planes: frames[0].image.planes.map(() => new Float32Array(width * height)),
    covered: new Uint8Array(width * height),
    masks: Array.from({ length: 4 }, () => new Uint8Array(width * height)),
  };
  const acc = createMergeAccumulator(width, height, frames[0].image.planes.length, isEncoded ? "debevec-hat" : "photon", isEncoded ? createCodeLookup(responseTable!) : undefined);
  ready.forEach((p, i) => {
    addFrameToMerge(acc, warpFrameForMerge(frames[i], p, registration.frames[i].masterToFrame, track.disks[i], referenceMoon, scratch));
    progress("merge", (i + 1) / ready.length);
  });
  const merged: MergeResult = finishMerge(acc);
  const master: PlaneImage = { width, height, planes: merged.radiance };
  lap("warp-and-merge");

  progress("renditions", 0);
  const refOffset = offsets?.[frames[ref].name];
  const sunCentre = refOffset ? { x: referenceMoon.x - refOffset.dx, y: referenceMoon.y - refOffset.dy } : undefined;
  const filterCentre = sunCentre ?? { x: referenceMoon.x, y: referenceMoon.y };
  const outsideMoon = createValidMask(width, height, referenceMoon);
  const luminance = computeLuminancePlane(master.planes);
  // White point at the top of the inner corona: the ring from the lunar limb to about 1.1 solar radii.
  const limbRing = { x: referenceMoon.x, y: referenceMoon.y, innerPx: referenceMoon.radiusPx, outerPx: 1.1 * referenceMoon.radiusPx };
  const natural = renderNatural(master, { valid: outsideMoon, luminance, limbRing });
  const filterDisk = { ...referenceMoon, radiusPx: referenceMoon.radiusPx + 1 };
  // Uncovered pixels and the canvas edge are masked, not enhanced. Along the edge, master pixels
  // within the largest frame displacement (plus the bicubic reach of 2 px) miss some frames.
  let reachPx = 0;
  for (const r of registration.frames) {
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
    frames: ready.map((p, i) => ({
      name: p.linear.name, width, height, exposureS: p.linear.exposureS, limb: p.limb,
      transform: fromAffine(registration.frames[i].masterToFrame, width, height),
      registrationPeak: registration.frames[i].peak,
      registeredAgainst: registration.frames[i].neighbour >= 0 ? frames[registration.frames[i].neighbour].name : null,
      weights: merged.frameStats[i],
    })),
    overall: {
      referenceFrame: frames[ref].name,
      moonCentre: { x: referenceMoon.x, y: referenceMoon.y },
      moonRadiusPx: referenceMoon.radiusPx,
      moonSource: track.sources[ref],
      sunCentre,
      filterCentre,
      dynamicRangeStops,
      natural: { blackPoint: natural.blackPoint, whitePoint: natural.whitePoint, beta: natural.beta },
      timingsMs,
      pipelineVersion: PIPELINE_VERSION,
      parameters: params,
    },
  };
}
