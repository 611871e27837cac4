// The whole reduction of one bracket: prepare each frame (linearize, mask, fit
// the limb), plan (register, solve offsets and transmissions), merge, render.
// The stages live in their own modules so that a caller can run them apart:
// frame-stage.ts (one frame), bracket-plan.ts (the whole bracket, plain data
// out), bracket-finish.ts (merge passes over slices of frames, and the finish).
// reduceBracket runs them all here, in order.
import { finishBracket, mergeKeptFrames } from "./bracket-finish";
import { planBracket, type FrameLeftOut } from "./bracket-plan";
import type { PreparedFrame } from "./frame-stage";
import type { LimbFit } from "./limb-fit";
import type { FrameWeightStats } from "./merge";
import type { SimilarityTransform } from "./similarity";
import type { BlackLevelSource, LinearFrame, PlaneImage, ProgressFn, ReductionParams } from "./types";

export { PIPELINE_VERSION } from "./version";
export { prepareFrame, warpFrameForMerge, type PreparedFrame } from "./frame-stage";
export { recoverBracketResponse, TRANSMISSION_TOLERANCE, validateBracket, type BracketPlan, type FrameLeftOut } from "./bracket-plan";
export { measureDynamicRangeStops } from "./renditions";

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

/**
 * Reduces a bracket to a master and its renditions. Throws ImagingError for
 * fewer than two frames, frames of different sizes, a frame without a positive
 * finite exposure, and fewer than two frames that can be placed on the Sun.
 */
export function reduceBracket(frames: LinearFrame[], params: ReductionParams, onProgress?: ProgressFn): ReductionResult {
  return reducePreparedBracket(frames, [], params, onProgress);
}

/**
 * reduceBracket for a caller that has already run prepareFrame on some frames
 * (e.g. in worker threads): `prepared[i]`, when present, must be
 * prepareFrame(frames[i], params) with the sRGB decode table for 8-bit frames;
 * missing entries are prepared here. The result is the same as reduceBracket's.
 */
export function reducePreparedBracket(frames: LinearFrame[], prepared: readonly (PreparedFrame | undefined)[], params: ReductionParams, onProgress?: ProgressFn, options: ReduceOptions = {}): ReductionResult {
  const { plan, ready } = planBracket(frames, prepared, params, { onProgress, keepPrepared: options.keepPrepared });
  const started = performance.now();
  const acc = mergeKeptFrames(plan, frames, ready, onProgress);
  return finishBracket(plan, acc, onProgress, performance.now() - started);
}
