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
}

/** Log-spaced exposures from minS to maxS, to 4 significant digits. */
export function computeExposureLadder(frames: number, minS = 1 / 2000, maxS = 1): number[] {
  if (frames === 1) return [minS];
  return Array.from({ length: frames }, (_, k) => Number((minS * (maxS / minS) ** (k / (frames - 1))).toPrecision(4)));
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
  });
  const { radiance, ...geometry } = truth;
  return {
    width,
    height,
    blackLevel: truth.blackLevel,
    whiteLevel: truth.whiteLevel,
    frames: modelFrames.map((frame) => ({ ...frame, name: frame.name.replace(/\.fits$/, "") })),
    truth: { ...geometry, exposuresS, seed },
    radiance,
  };
}
