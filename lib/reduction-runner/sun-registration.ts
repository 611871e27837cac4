// Turns the sky geometry of a bracket into what lib/imaging's pipeline takes:
// a Moon-minus-Sun offset in master pixels per frame (params.moonMinusSunPx).
//
// Plate scale: the Moon's topocentric semi-diameter at the reference frame's
// instant over the median radius of the sound limb fits (lib/astro
// computeMeasuredPlateScaleArcsecPerPx). Orientation: the north angle when the
// kit and mount give it (--north-angle), otherwise estimated from the bracket
// (sun-geometry.ts estimateNorthAngle) on the Moon centres of a corona-only
// registration, where the corona of all frames agrees.
//
// The pipeline fits every limb again inside reduceBracket: the limb radius is
// needed before it runs, and its API takes the offsets up front. That doubles the
// limb-fit stage (and the registration stage when the orientation is estimated);
// see the runner's notes.
import { computeMeasuredPlateScaleArcsecPerPx } from "@/lib/astro";
import { prepareFrame, type PreparedFrame } from "@/lib/imaging/pipeline";
import { chooseReferenceFrame, registerFrames } from "@/lib/imaging/register";
import { applyAffine, invertAffine } from "@/lib/imaging/similarity";
import { createSrgbDecodeTable } from "@/lib/imaging/srgb";
import type { LinearFrame, ReductionParams } from "@/lib/imaging/types";
import { ImagingError } from "@/lib/imaging/errors";
import { ReductionInputError } from "./errors";
import { convertSkyOffsetToPx, estimateNorthAngle, type FrameSky, type NorthAngleEstimate } from "./sun-geometry";

/** An estimated orientation looser than this is refused: the Sun's centre would move by |offset| x sigma. */
export const MAX_NORTH_ANGLE_SIGMA_DEG = 5;

export interface SunRegistration {
  referenceIndex: number;
  plateScaleArcsecPerPx: number;
  /** Median radius of the sound limb fits, px. */
  limbRadiusPx: number;
  northAngleDeg: number;
  northAngleSource: "given" | "estimated";
  estimate?: NorthAngleEstimate;
  /** Moon minus Sun per frame in master pixels (x right, y down), keyed by frame name. */
  offsetsPx: Record<string, { dx: number; dy: number }>;
}

function computeMedian(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** Relative weight of a Moon centre: sound fits 1, doubtful ones (clipped limbs, biased by about 0.2 px) 1/16, as in lib/imaging's moon-track. */
function weighLimb(prepared: PreparedFrame): number {
  return prepared.limb.verdict === "sound" ? 1 : 1 / 16;
}

function estimateFromBracket(frames: LinearFrame[], prepared: readonly PreparedFrame[], skies: FrameSky[], referenceIndex: number, scaleArcsecPerPx: number): NorthAngleEstimate {
  const { width, height } = frames[0].image;
  const registration = registerFrames(
    prepared.map((p) => ({
      name: p.linear.name, width, height, exposureS: p.linear.exposureS, luminance: p.luminance, clipped: p.linear.clipped,
      noiseSigma: p.linear.noiseSigma,
      limb: p.limb.verdict === "failed" ? { x: NaN, y: NaN, radiusPx: NaN } : { x: p.limb.x, y: p.limb.y, radiusPx: p.limb.radiusPx },
    })),
    { mode: "corona", referenceIndex },
  );
  const samples = prepared.flatMap((p, i) => {
    if (p.limb.verdict === "failed" || registration.frames[i].method === "failed") return [];
    const moon = applyAffine(invertAffine(registration.frames[i].masterToFrame), p.limb.x, p.limb.y);
    return [{ x: moon.x, y: moon.y, weight: weighLimb(p), northArcsec: skies[i].state.moonMinusSun.northArcsec, eastArcsec: skies[i].state.moonMinusSun.eastArcsec }];
  });
  const estimate = estimateNorthAngle(samples, scaleArcsecPerPx);
  if (!(estimate.sigmaDeg <= MAX_NORTH_ANGLE_SIGMA_DEG)) {
    const spanS = (Math.max(...skies.map((s) => s.midExposureMs)) - Math.min(...skies.map((s) => s.midExposureMs))) / 1000;
    throw new ReductionInputError(
      "orientation-unknown",
      `Image orientation unknown: the Moon moved only ${estimate.spreadPx.toFixed(2)} px against the corona over the bracket's ${spanS.toFixed(1)} s, too little to find ` +
        `it (estimate ${estimate.northAngleDeg.toFixed(1)} +- ${estimate.sigmaDeg.toFixed(1)} deg)`,
    );
  }
  return estimate;
}

/**
 * Offsets for the pipeline. `skies` are in the frames' order. Throws the
 * pipeline's ImagingError naming the frame when a limb cannot be found.
 * `preparedFrames[i]`, when given, must be prepareFrame(frames[i], params).
 */
export function resolveSunRegistration(frames: LinearFrame[], skies: FrameSky[], params: ReductionParams, northAngleDeg?: number, preparedFrames?: readonly PreparedFrame[]): SunRegistration {
  const referenceIndex = chooseReferenceFrame(frames.map((f) => f.exposureS));
  const table = frames[0].encoding === "srgb8" ? createSrgbDecodeTable() : undefined;
  // Frames prepared already (with these params) are used as they are: a flow has them from its parts.
  const prepared = preparedFrames ?? frames.map((f) => prepareFrame(f, params, table));
  const sound = prepared.filter((p) => p.limb.verdict === "sound");
  const found = prepared.filter((p) => p.limb.verdict !== "failed");
  if (found.length === 0) throw new ImagingError("limb-not-found", "the lunar limb could not be found in any frame, so the plate scale cannot be measured");
  const limbRadiusPx = computeMedian((sound.length > 0 ? sound : found).map((p) => p.limb.radiusPx));
  const plateScaleArcsecPerPx = computeMeasuredPlateScaleArcsecPerPx(skies[referenceIndex].state.moon.semiDiameterArcsec, limbRadiusPx);
  let estimate: NorthAngleEstimate | undefined;
  let angle = northAngleDeg;
  if (angle === undefined) {
    estimate = estimateFromBracket(frames, prepared, skies, referenceIndex, plateScaleArcsecPerPx);
    angle = estimate.northAngleDeg;
  }
  const offsetsPx = Object.fromEntries(
    skies.map((s) => [s.name, convertSkyOffsetToPx(s.state.moonMinusSun.northArcsec, s.state.moonMinusSun.eastArcsec, angle, plateScaleArcsecPerPx)]),
  );
  return {
    referenceIndex,
    plateScaleArcsecPerPx,
    limbRadiusPx,
    northAngleDeg: ((angle % 360) + 360) % 360,
    northAngleSource: northAngleDeg === undefined ? "estimated" : "given",
    estimate,
    offsetsPx,
  };
}
