// The scale benchmark's brackets: one exposure ladder of 9 steps (1/2000 s to 1 s)
// taken 9 times over, written once under the ignored .cache/ folder as 81 16-bit
// TIFFs. The 9-, 27- and 81-frame brackets are the first 1, 3 and 9 passes of the
// ladder, so each covers the same exposure range and a larger one only adds repeats.
//
// Frames are made and written one at a time (one frame's planes and the model's
// working planes in memory), never the whole set: the synthetic model renders one frame per call with that
// frame's pointing, Moon position and capture time. The model's own noise would
// start from the same seeded stream in every call (the seed also draws the scene), so
// repeats of one exposure would carry identical noise; the model therefore renders
// each frame's mean light without noise, at an exposure SUB_DN times longer so that
// its rounding to whole numbers keeps 1/SUB_DN DN, and the same photon and read noise
// as the model's (Poisson electrons, Gaussian read noise, rounded, clipped) is drawn
// here from a stream of the frame's own.
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { createRng, sampleGaussian, samplePoisson } from "@/lib/imaging/random";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { computeExposureLadder } from "../lib-synth/from-model";
import type { SynthBracket } from "../lib-synth/types";
import { writeBracketFrames } from "../lib-synth/write-frames";

export const SCALE_WIDTH = 1500;
export const SCALE_HEIGHT = 1000;
/** Steps of the exposure ladder; every bracket is this ladder repeated. */
export const SCALE_LADDER_STEPS = 9;
/** Passes of the ladder per bracket: 9, 27 and 81 frames. */
export const SCALE_PASSES = [1, 3, 9] as const;
export const SCALE_SEED = 11;

// The camera and timing of synthesizeBracket's defaults.
const BLACK_DN = 512;
const WHITE_DN = 16383;
const READ_NOISE_DN = 2.5;
const ELECTRONS_PER_DN = 1;
/** Sub-DN steps kept by the noiseless render (see the header). */
const SUB_DN = 4096;
const FRAME_INTERVAL_S = 1.5;
const CAPTURE_START_MS = Date.UTC(2027, 7, 2, 10, 3, 0);

export interface ScaleBracket {
  frames: number;
  files: string[];
  exposuresS: number[];
}

export interface ScaleBrackets {
  dir: string;
  brackets: ScaleBracket[];
  /** Seconds spent making the frames now; 0 when they came from the cache. */
  madeS: number;
}

interface FrameList {
  files: string[];
  exposuresS: number[];
}

function frameCount(passes: number): number {
  return passes * SCALE_LADDER_STEPS;
}

/** One frame of the model with noise of its own (see the header). */
function renderFrame(index: number, exposureS: number, pointing: { dx: number; dy: number; rotationDeg: number }, driftPx: { dx: number; dy: number }, sunRadiusPx: number) {
  const { frames } = synthesizeBracket({
    width: SCALE_WIDTH,
    height: SCALE_HEIGHT,
    channels: 3,
    exposuresS: [exposureS * SUB_DN],
    sunRadiusPx,
    seed: SCALE_SEED,
    shiftsPx: [{ dx: pointing.dx, dy: pointing.dy }],
    rotationsDeg: [pointing.rotationDeg],
    // The model's default first offset of the Moon, moved on by this frame's place in the sequence.
    moonOffsetPx: { dx: 0.012 * sunRadiusPx + index * driftPx.dx, dy: -0.008 * sunRadiusPx + index * driftPx.dy },
    captureStartMs: CAPTURE_START_MS + index * FRAME_INTERVAL_S * 1000,
    noise: false,
    blackLevel: 0,
    whiteLevel: 2 ** 31,
  });
  const frame = frames[0];
  const rng = createRng((Math.imul(SCALE_SEED, 0x9e3779b1) + index * 0x85ebca6b + 1) >>> 0);
  for (const plane of frame.planes) {
    for (let i = 0; i < plane.length; i++) {
      const meanDn = plane[i] / SUB_DN;
      const v = Math.round(samplePoisson(rng, meanDn * ELECTRONS_PER_DN) / ELECTRONS_PER_DN + READ_NOISE_DN * sampleGaussian(rng) + BLACK_DN);
      plane[i] = v < 0 ? 0 : v > WHITE_DN ? WHITE_DN : v;
    }
  }
  return { ...frame, exposureS, blackLevel: BLACK_DN, name: `scale-${String(index + 1).padStart(2, "0")}` };
}

/** The long bracket's frames: the largest set, the ladder taken 22 times and two steps more. */
export const SCALE_LONG_FRAMES = 200;

/** The 81 frames, made once; later calls read the list from the cache. */
export async function prepareScaleBrackets(cacheRoot: string, onFrame?: (done: number, total: number) => void): Promise<ScaleBrackets> {
  const total = frameCount(SCALE_PASSES[SCALE_PASSES.length - 1]);
  const made = await prepareScaleFrames(cacheRoot, total, onFrame);
  const brackets = SCALE_PASSES.map((passes) => {
    const n = frameCount(passes);
    return { frames: n, files: made.list.files.slice(0, n).map((f) => join(made.dir, f)), exposuresS: made.list.exposuresS.slice(0, n) };
  });
  return { dir: made.dir, brackets, madeS: made.madeS };
}

/** The long bracket of SCALE_LONG_FRAMES frames, made once into a folder of its own (its Moon drifts as far over 200 frames as the others' over 81). */
export async function prepareLongScaleBracket(cacheRoot: string, onFrame?: (done: number, total: number) => void): Promise<ScaleBrackets> {
  const made = await prepareScaleFrames(cacheRoot, SCALE_LONG_FRAMES, onFrame);
  return { dir: made.dir, brackets: [{ frames: SCALE_LONG_FRAMES, files: made.list.files.map((f) => join(made.dir, f)), exposuresS: made.list.exposuresS }], madeS: made.madeS };
}

async function prepareScaleFrames(cacheRoot: string, total: number, onFrame?: (done: number, total: number) => void): Promise<{ dir: string; list: FrameList; madeS: number }> {
  const dir = join(cacheRoot, `bench-scale-${SCALE_WIDTH}x${SCALE_HEIGHT}-${total}-seed${SCALE_SEED}`);
  const listPath = join(dir, "frames.json");
  let list: FrameList;
  let madeS = 0;
  if (existsSync(listPath)) {
    list = JSON.parse(readFileSync(listPath, "utf8")) as FrameList;
  } else {
    const started = performance.now();
    mkdirSync(dir, { recursive: true });
    const ladder = computeExposureLadder(SCALE_LADDER_STEPS);
    const sunRadiusPx = Math.round(Math.min(SCALE_WIDTH, SCALE_HEIGHT) / 8);
    // As the model's brackets do: shifts up to 3 px and turns up to 0.2 degrees. The Moon
    // moves 0.02 solar radii over the whole sequence: with its radius 1.045 times the Sun's
    // and its first offset 0.014 radii, it covers the Sun throughout (the model refuses
    // a frame that would leave the Sun uncovered).
    const rng = createRng(SCALE_SEED ^ 0x5eed);
    const drift = (0.02 / total) * sunRadiusPx;
    const driftPx = { dx: drift, dy: -drift / 3 };
    list = { files: [], exposuresS: [] };
    for (let f = 0; f < total; f++) {
      const exposureS = ladder[f % SCALE_LADDER_STEPS];
      const pointing = { dx: (rng() - 0.5) * 6, dy: (rng() - 0.5) * 6, rotationDeg: (rng() - 0.5) * 0.4 };
      const frame = renderFrame(f, exposureS, pointing, driftPx, sunRadiusPx);
      const one: SynthBracket = { width: SCALE_WIDTH, height: SCALE_HEIGHT, blackLevel: BLACK_DN, whiteLevel: WHITE_DN, frames: [frame], truth: {} };
      const [written] = await writeBracketFrames(one, dir, ["tiff"]);
      list.files.push(written.files.tiff!);
      list.exposuresS.push(exposureS);
      onFrame?.(f + 1, total);
    }
    // Written last: its presence means the cache is complete.
    writeFileSync(listPath, JSON.stringify(list));
    madeS = (performance.now() - started) / 1000;
  }
  return { dir, list, madeS };
}
