// Per-frame stages of a reduction: prepare one frame (linearize, mask, fit the
// limb) and warp one frame into master pixels as merge input. Each works on one
// frame alone, so callers may run them in worker threads or other processes.
import { dilateMask } from "./blur";
import { fitLimb, type LimbFit } from "./limb-fit";
import { linearizeFrame, repairDefects, type LinearizedFrame } from "./linearize";
import type { MergeFrameInput } from "./merge";
import type { LunarDisk } from "./radial";
import { warpMask, warpPlanes, type WarpTarget } from "./resample";
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
 * Per-frame stage: the frame warped into master pixels as merge input. A master
 * pixel near either lunar limb is used only when this frame and the reference
 * agree on whether the Moon covers it (the Moon moves between frames), or
 * whose limb lies where the reference's does.
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
        const agree = (dFrame > LIMB_MARGIN_PX && dRef > LIMB_MARGIN_PX) || (dFrame < -LIMB_MARGIN_PX && dRef < -LIMB_MARGIN_PX) || Math.abs(dFrame - dRef) <= SAME_LIMB_PX;
        if (!agree) covered[y * width + x] = 0;
      }
    }
  }
  return { planes, exposureS: effectiveExposureS ?? linear.exposureS, clipped, noiseFloor, covered, clipLevel: linear.clipLevel, masked, noiseSigma: linear.noiseSigma };
}

