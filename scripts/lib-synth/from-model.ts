// Wires the pure synthetic model (lib/imaging/synth-model.ts) to the file
// writers: chooses the exposure ladder, small pointing errors between frames
// and the Moon's drift, and turns the model's truth into JSON.
import { createRng } from "@/lib/imaging/random";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import type { SynthBracket } from "./types";

export interface ModelBracketOptions {
  width: number;
  height: number;
  frames: number;
  seed: number;
  /** Exposure times in seconds; default a log-spaced ladder from 1/2000 s to 1 s. */
  exposuresS?: number[];
  /** UTC start of the first exposure; default the model's own. */
  captureStartMs?: number;
  /** Per-frame camera pointing errors (shifts up to 3 px, turns up to 0.2 deg); default true. */
  hasPointingErrors?: boolean;
  /**
   * A camera as real ones deliver brackets: an offset of a few hundred DN left in
   * FITS and 16-bit TIFF data and named nowhere, 40 hot pixels fixed on the sensor,
   * a satellite trail across one frame, a thin cloud over another (transmission
   * 0.6), and no capture times in the files.
   */
  isRealCamera?: boolean;
}

/** Log-spaced exposures from minS to maxS, to 4 significant digits. */
export function computeExposureLadder(frames: number, minS = 1 / 2000, maxS = 1): number[] {
  if (frames === 1) return [minS];
  return Array.from({ length: frames }, (_, k) => Number((minS * (maxS / minS) ** (k / (frames - 1))).toPrecision(4)));
}

/** The faults of isRealCamera, placed by the seeded generator. */
function realCameraFaults(width: number, height: number, frameCount: number, rng: () => number) {
  return {
    blackLevel: 384,
    sensorDefects: Array.from({ length: 40 }, () => ({ kind: "hot" as const, x: Math.floor(rng() * width), y: Math.floor(rng() * height), dnPerS: 500 + 3000 * rng() })),
    trail: { frame: Math.floor(frameCount / 3), from: { x: 0, y: height * rng() }, to: { x: width - 1, y: height * rng() }, sigmaPx: 1.5, peakDn: 3000 },
    clouds: frameCount > 3 ? [{ frame: frameCount - 2, transmission: 0.6 }] : [],
  };
}

export function createModelBracket(options: ModelBracketOptions): SynthBracket {
  const { width, height, frames, seed } = options;
  const exposuresS = options.exposuresS ?? computeExposureLadder(frames);
  const sunRadiusPx = Math.round(Math.min(width, height) / 8);
  const rng = createRng(seed ^ 0x5eed);
  const pointing = options.hasPointingErrors ?? true;
  const shiftsPx = exposuresS.map(() => (pointing ? { dx: (rng() - 0.5) * 6, dy: (rng() - 0.5) * 6 } : { dx: 0, dy: 0 }));
  const rotationsDeg = exposuresS.map(() => (pointing ? (rng() - 0.5) * 0.4 : 0));
  // The Moon must cover the Sun in every frame (radius ratio 1.045): keep its path inside 0.03 R.
  const driftPx = Math.min(0.003, 0.03 / exposuresS.length) * sunRadiusPx;
  const { frames: modelFrames, truth } = synthesizeBracket({
    width,
    height,
    channels: 3,
    exposuresS,
    sunRadiusPx,
    seed,
    shiftsPx,
    rotationsDeg,
    moonDriftPxPerFrame: { dx: driftPx, dy: -driftPx / 3 },
    captureStartMs: options.captureStartMs,
    ...(options.isRealCamera ? realCameraFaults(width, height, exposuresS.length, rng) : {}),
  });
  const { radiance, trailDn, ...geometry } = truth;
  void trailDn;
  return {
    ...(options.isRealCamera ? { offsetInFiles: "unlabelled" as const, hasCaptureTimes: false } : {}),
    width,
    height,
    blackLevel: truth.blackLevel,
    whiteLevel: truth.whiteLevel,
    frames: modelFrames.map((frame) => ({ ...frame, name: frame.name.replace(/\.fits$/, "") })),
    truth: { ...geometry, exposuresS, seed },
    radiance,
  };
}
