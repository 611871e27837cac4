// Per-frame stages of a reduction: prepare one frame (linearize, mask, fit the
// limb) and warp one frame into master pixels as merge input. Each works on one
// frame alone, so callers may run them in worker threads or other processes.
import { dilateMask } from "./blur";
import { fitLimb, type LimbFit } from "./limb-fit";
import { linearizeFrame, patchDefects, type LinearizedFrame } from "./linearize";
import type { MergeFrameInput } from "./merge";
import type { LunarDisk } from "./radial";
import { warpMasks, warpMasksAtPoints, warpPlanes, warpPlanesAtPoints, type WarpTarget } from "./resample";
import type { AffineSimilarity } from "./similarity";
import type { LinearFrame, ReductionParams } from "./types";

/** Master pixels this close to a lunar limb take light only from frames that agree on Moon or corona there. */
export const LIMB_MARGIN_PX = 3;
/**
 * ...or from frames whose limb lies where the reference's does, to within this: the
 * pixel is then occulted (and its light blurred by the edge) alike in both. Without
 * this, the band within LIMB_MARGIN_PX of the limb took light only from the reference,
 * and where the reference clipped there it showed as a flat grey ring.
 */
const SAME_LIMB_PX = 0.5;

export interface PreparedFrame {
  /** Linearized frame; for linear input its planes are released after the limb fit (the merge warps the originals). */
  linear: LinearizedFrame;
  luminance: Float32Array;
  limb: LimbFit;
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
 * prepareFrame for a frame whose limb was fitted elsewhere (another process):
 * the same linearization, the fit taken as given. Linearizing again is cheap
 * beside the fit, and lighter to pass around than the linearized planes.
 */
export function prepareFrameWithLimb(frame: LinearFrame, params: ReductionParams, limb: LimbFit, responseTable?: Float64Array): PreparedFrame {
  const linear = linearizeFrame(frame, params.clipFraction, { responseTable, keepPlanes: frame.encoding !== "linear" });
  return { linear, luminance: linear.luminance, limb };
}

/**
 * A frame opened for warping into master pixels, band by band: its arrays read
 * once (the frame may keep them on disk behind getters), the clipped mask
 * widened, and its defects repaired in its own planes until release() (see
 * patchDefects). Bands come from warpFrameBand.
 */
export interface FrameWarp {
  width: number;
  height: number;
  /** The map is the identity: bands are copies, not warps. */
  identity: boolean;
  release: () => void;
  /** @internal */
  source: {
    planes: Float32Array[];
    clipped: Uint8Array;
    noiseFloor: Uint8Array;
    masked?: Uint8Array;
    black: number;
    masterToFrame: AffineSimilarity;
    frameMoon: LunarDisk;
    referenceMoon: LunarDisk;
    exposureS: number;
    clipLevel: number;
    noiseSigma?: number;
  };
}

/** The numbers (not the pixels) a prepared frame brings to the merge: its exposure (the plan's effective one, when given), clip level and read noise. */
export function describeMergeFrame(prepared: PreparedFrame, effectiveExposureS?: number): { exposureS: number; clipLevel: number; noiseSigma?: number } {
  const { linear } = prepared;
  return { exposureS: effectiveExposureS ?? linear.exposureS, clipLevel: linear.clipLevel, noiseSigma: linear.noiseSigma };
}

/**
 * Opens a frame for warpFrameBand. `dilation` may hold two mask buffers of the
 * frame's size, reused frame after frame for the widened clipped mask.
 */
export function openFrameWarp(
  frame: LinearFrame,
  prepared: PreparedFrame,
  masterToFrame: AffineSimilarity,
  frameMoon: LunarDisk,
  referenceMoon: LunarDisk,
  dilation?: Uint8Array[],
  effectiveExposureS?: number,
  place: <T extends Float32Array | Uint8Array>(array: T) => T = (array) => array,
): FrameWarp {
  const { linear } = prepared;
  const { width, height } = linear;
  const identity = masterToFrame.a === 1 && masterToFrame.b === 0 && masterToFrame.tx === 0 && masterToFrame.ty === 0;
  const isLinear = frame.encoding === "linear";
  // `place` may copy the frame's arrays elsewhere (a runner's shared memory) before they are used.
  const planes = (isLinear ? frame.image.planes : linear.planes).map(place);
  const masked = linear.masked && place(linear.masked);
  let clipped = linear.clipped;
  // Bicubic reaches two pixels: widen the clipped mask by one more before sampling it.
  if (!identity) clipped = dilateMask(clipped, width, height, 1, dilation && dilation.length >= 2 ? [dilation[0], dilation[1]] : undefined);
  clipped = place(clipped);
  // A defect's own value never reaches the master: the warp reads it as the median of its sound
  // neighbours (so the bicubic support of the pixels around it is not spoilt), and the master
  // pixel that lands on it is masked. Only where every frame's defect lands is a master pixel empty.
  const restore = masked ? planes.map((p) => patchDefects(p, masked, width, height)) : [];
  return {
    width, height, identity,
    release: () => {
      for (let c = restore.length - 1; c >= 0; c--) restore[c]();
      restore.length = 0;
    },
    source: {
      planes, clipped, noiseFloor: place(linear.noiseFloor), masked, black: isLinear ? frame.blackLevel : 0, masterToFrame, frameMoon, referenceMoon,
      ...describeMergeFrame(prepared, effectiveExposureS),
    },
  };
}

/**
 * An opened frame's pixels and numbers as plain data, every array at the top
 * level (what a runner's threads are given: see merge-kernels.ts). The frame is
 * the master's size; its exposure, clip level and noise travel with the band.
 */
export interface FrameWarpArrays {
  identity: boolean;
  sourcePlanes: Float32Array[];
  sourceClipped: Uint8Array;
  sourceNoiseFloor: Uint8Array;
  sourceMasked: Uint8Array | undefined;
  black: number;
  a: number;
  b: number;
  tx: number;
  ty: number;
  moonX: number;
  moonY: number;
  moonRadiusPx: number;
  referenceX: number;
  referenceY: number;
  referenceRadiusPx: number;
}

/** An opened frame's FrameWarpArrays. */
export function listFrameWarpArrays(warp: FrameWarp): FrameWarpArrays {
  const { source } = warp;
  const { a, b, tx, ty } = source.masterToFrame;
  return {
    identity: warp.identity, sourcePlanes: source.planes, sourceClipped: source.clipped, sourceNoiseFloor: source.noiseFloor, sourceMasked: source.masked,
    black: source.black, a, b, tx, ty,
    moonX: source.frameMoon.x, moonY: source.frameMoon.y, moonRadiusPx: source.frameMoon.radiusPx,
    referenceX: source.referenceMoon.x, referenceY: source.referenceMoon.y, referenceRadiusPx: source.referenceMoon.radiusPx,
  };
}

/** The frame that listFrameWarpArrays described, opened again over the same arrays (on another thread); its release does nothing. */
export function openFrameWarpOnArrays(arrays: FrameWarpArrays & { width: number; height: number; exposureS: number; clipLevel: number; noiseSigma: number }): FrameWarp {
  const { width, height, identity, a, b, tx, ty } = arrays;
  return {
    width, height, identity,
    release: () => undefined,
    source: {
      planes: arrays.sourcePlanes, clipped: arrays.sourceClipped, noiseFloor: arrays.sourceNoiseFloor, masked: arrays.sourceMasked, black: arrays.black,
      masterToFrame: { a, b, tx, ty },
      frameMoon: { x: arrays.moonX, y: arrays.moonY, radiusPx: arrays.moonRadiusPx },
      referenceMoon: { x: arrays.referenceX, y: arrays.referenceY, radiusPx: arrays.referenceRadiusPx },
      exposureS: arrays.exposureS, clipLevel: arrays.clipLevel, noiseSigma: Number.isNaN(arrays.noiseSigma) ? undefined : arrays.noiseSigma,
    },
  };
}

/**
 * Master rows y0 .. y1 - 1 of an opened frame as merge input (arrays of the
 * band's size, in `scratch` when given: planes, covered and three masks of at
 * least the band's size). Every pixel is the one a whole-frame warp gives.
 */
export function warpFrameBand(warp: FrameWarp, y0: number, y1: number, scratch?: WarpTarget): MergeFrameInput {
  const { width, height, identity, source } = warp;
  const { masterToFrame, frameMoon: moon, referenceMoon } = source;
  const n = (y1 - y0) * width;
  const from = y0 * width;
  const window = { width, height: y1 - y0, originY: y0 };
  const view = <T extends Float32Array | Uint8Array>(a: T | undefined): T | undefined => (a && a.length >= n ? (a.subarray(0, n) as T) : undefined);
  const target: WarpTarget | undefined = scratch && { planes: scratch.planes.map((p) => view(p)!), covered: view(scratch.covered)! };
  const masks = scratch?.masks && scratch.masks.length >= 3 ? scratch.masks.slice(-3).map((m) => view(m)) : [];
  let planes: Float32Array[];
  let covered: Uint8Array;
  let clipped: Uint8Array;
  let noiseFloor: Uint8Array;
  let masked = source.masked;
  if (identity) {
    planes = source.planes.map((p, c) => {
      const band = p.subarray(from, from + n);
      return target ? (target.planes[c].set(band), target.planes[c]) : Float32Array.from(band);
    });
    covered = target ? target.covered.fill(1) : new Uint8Array(n).fill(1);
    clipped = source.clipped.subarray(from, from + n);
    noiseFloor = source.noiseFloor.subarray(from, from + n);
    masked = masked?.subarray(from, from + n);
  } else {
    const warped = warpPlanes(source.planes, width, height, masterToFrame, window, "bicubic", target);
    planes = warped.planes;
    covered = warped.covered;
    // Clipped and noise floor count as such beyond the frame; a defect does not.
    [clipped, noiseFloor, masked] = warpMasks(masked ? [source.clipped, source.noiseFloor, masked] : [source.clipped, source.noiseFloor], width, height, masterToFrame, window, [1, 1, 0], masks);
  }
  if (source.black !== 0) {
    const black = source.black;
    for (const p of planes) for (let i = 0; i < p.length; i++) p[i] -= black;
  }
  if (!identity) {
    // Near the limbs, only where this frame and the reference agree on the Moon (see warpFrameForMerge).
    const box = limbBox(source.frameMoon, referenceMoon, width, height);
    for (let y = Math.max(y0, box.top); y <= Math.min(y1 - 1, box.bottom); y++) {
      for (let x = box.x0; x <= box.x1; x++) if (!isLimbAgreed(moon, referenceMoon, x, y)) covered[(y - y0) * width + x] = 0;
    }
  }
  return { planes, exposureS: source.exposureS, clipped, noiseFloor, covered, clipLevel: source.clipLevel, masked, noiseSigma: source.noiseSigma };
}

/** The master pixels where a frame and the reference may disagree on the Moon: a box around the reference's limb. */
function limbBox(moon: LunarDisk, referenceMoon: LunarDisk, width: number, height: number): { top: number; bottom: number; x0: number; x1: number } {
  const reach = Math.max(moon.radiusPx, referenceMoon.radiusPx) + LIMB_MARGIN_PX + Math.hypot(moon.x - referenceMoon.x, moon.y - referenceMoon.y);
  return {
    top: Math.max(0, Math.floor(referenceMoon.y - reach)),
    bottom: Math.min(height - 1, Math.ceil(referenceMoon.y + reach)),
    x0: Math.max(0, Math.floor(referenceMoon.x - reach)),
    x1: Math.min(width - 1, Math.ceil(referenceMoon.x + reach)),
  };
}

/** Whether the frame and the reference agree on the Moon at master pixel (x, y): both clear of it, both on it, or their limbs in the same place. */
function isLimbAgreed(moon: LunarDisk, referenceMoon: LunarDisk, x: number, y: number): boolean {
  const dFrame = Math.hypot(x - moon.x, y - moon.y) - moon.radiusPx;
  const dRef = Math.hypot(x - referenceMoon.x, y - referenceMoon.y) - referenceMoon.radiusPx;
  return (dFrame > LIMB_MARGIN_PX && dRef > LIMB_MARGIN_PX) || (dFrame < -LIMB_MARGIN_PX && dRef < -LIMB_MARGIN_PX) || Math.abs(dFrame - dRef) <= SAME_LIMB_PX;
}

/**
 * An opened frame as merge input at single master pixels only (`pixels`, master
 * indices): entry j of every array is what warpFrameBand gives at pixels[j], bit
 * for bit. The second merge pass samples a frame's outlier scale at a regular
 * grid of pixels before it adds the frame; warping just those costs a few
 * hundred thousand pixels instead of a whole frame.
 */
export function warpFramePoints(warp: FrameWarp, pixels: Int32Array): MergeFrameInput {
  const { width, height, identity, source } = warp;
  const m = pixels.length;
  const planes = source.planes.map(() => new Float32Array(m));
  const covered = new Uint8Array(m);
  let clipped = new Uint8Array(m);
  let noiseFloor = new Uint8Array(m);
  let masked = source.masked ? new Uint8Array(m) : undefined;
  const xs = new Int32Array(m);
  const ys = new Int32Array(m);
  for (let j = 0; j < m; j++) {
    xs[j] = pixels[j] % width;
    ys[j] = (pixels[j] - xs[j]) / width;
  }
  if (identity) {
    for (let j = 0; j < m; j++) {
      const i = pixels[j];
      source.planes.forEach((p, c) => { planes[c][j] = p[i]; });
    }
    covered.fill(1);
    clipped = Uint8Array.from(pixels, (i) => source.clipped[i]);
    noiseFloor = Uint8Array.from(pixels, (i) => source.noiseFloor[i]);
    const sourceMasked = source.masked;
    if (sourceMasked) masked = Uint8Array.from(pixels, (i) => sourceMasked[i]);
  } else {
    warpPlanesAtPoints(source.planes, width, height, source.masterToFrame, xs, ys, planes, covered);
    const sources = source.masked ? [source.clipped, source.noiseFloor, source.masked] : [source.clipped, source.noiseFloor];
    const outs = source.masked ? [clipped, noiseFloor, masked!] : [clipped, noiseFloor];
    warpMasksAtPoints(sources, width, height, source.masterToFrame, xs, ys, [1, 1, 0], outs);
  }
  if (source.black !== 0) {
    const black = source.black;
    for (const p of planes) for (let j = 0; j < m; j++) p[j] -= black;
  }
  if (!identity) {
    const box = limbBox(source.frameMoon, source.referenceMoon, width, height);
    for (let j = 0; j < m; j++) {
      const x = xs[j], y = ys[j];
      if (y >= box.top && y <= box.bottom && x >= box.x0 && x <= box.x1 && !isLimbAgreed(source.frameMoon, source.referenceMoon, x, y)) covered[j] = 0;
    }
  }
  return { planes, exposureS: source.exposureS, clipped, noiseFloor, covered, clipLevel: source.clipLevel, masked, noiseSigma: source.noiseSigma };
}

/**
 * Per-frame stage: the frame warped into master pixels as merge input. A master
 * pixel near either lunar limb is used only when this frame and the reference
 * agree on whether the Moon covers it (the Moon moves between frames), or
 * whose limb lies where the reference's does. With scratch, its buffers hold
 * the result (two of its masks also serve the clipped mask's widening).
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
  const masks = scratch?.masks && scratch.masks.length >= 5 ? scratch.masks : undefined;
  const warp = openFrameWarp(frame, prepared, masterToFrame, frameMoon, referenceMoon, masks?.slice(0, 2), effectiveExposureS);
  try {
    return warpFrameBand(warp, 0, warp.height, scratch && { planes: scratch.planes, covered: scratch.covered, masks: masks?.slice(2) });
  } finally {
    warp.release();
  }
}
