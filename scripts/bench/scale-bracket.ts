// The scale benchmark's brackets: one exposure ladder of 9 steps (1/2000 s to 1 s)
// taken 9 times over, written once under the ignored .cache/ folder as 81 16-bit
// TIFFs. The 9-, 27- and 81-frame brackets are the first 1, 3 and 9 passes of the
// ladder, so each covers the same exposure range and a larger one only adds repeats.
//
// Frames are made pass by pass and written one at a time, never the whole set: the
// synthetic model renders each pass of the ladder once, with that pass's pointing and
// Moon position, as a camera on a tracking mount fires a bracket within seconds, and
// each frame of the pass takes that light moved by a whole-pixel nudge of its own
// (the mount's jitter between exposures), times its exposure. The model's own noise
// would start from the same seeded stream in every call (the seed also draws the
// scene), so repeats of one exposure would carry identical noise; the model therefore
// renders the light without noise, per SUB_DN seconds so that its rounding to whole
// numbers keeps 1/SUB_DN DN per second, and the same photon and read noise as the
// model's (Poisson electrons, Gaussian read noise, rounded, clipped) is drawn here
// from a stream of the frame's own. Two processes make alternate passes (rendering a
// 24 MP pass takes about 17 s, its noise about 20 s a frame).
import { spawn } from "node:child_process";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { createInterface } from "node:readline";
import { createRng, sampleGaussian, samplePoisson } from "@/lib/imaging/random";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { computeExposureLadder } from "../lib-synth/from-model";
import type { SynthBracket } from "../lib-synth/types";
import { writeBracketFrames } from "../lib-synth/write-frames";

export const SCALE_WIDTH = 1500;
export const SCALE_HEIGHT = 1000;

/** A bracket's frame size; the default is SCALE_WIDTH x SCALE_HEIGHT (`--size 6000x4000` for 24 MP). */
export interface ScaleSize {
  width: number;
  height: number;
}

export const DEFAULT_SCALE_SIZE: ScaleSize = { width: SCALE_WIDTH, height: SCALE_HEIGHT };
/** Steps of the exposure ladder; every bracket is this ladder repeated. */
export const SCALE_LADDER_STEPS = 9;
/** Passes of the ladder per bracket: 9, 27 and 81 frames. */
export const SCALE_PASSES = [1, 3, 9] as const;
export const SCALE_SEED = 11;
/** In the cache folder's name: frames made another way are never taken for these. */
const SCALE_FRAMES_VERSION = "v2";

// The camera and timing of synthesizeBracket's defaults.
const BLACK_DN = 512;
const WHITE_DN = 16383;
const READ_NOISE_DN = 2.5;
const ELECTRONS_PER_DN = 1;
/** Sub-DN steps kept by the noiseless render (see the header). */
const SUB_DN = 4096;
/**
 * Photon counts of at least this mean are drawn from the normal law of the same mean and
 * variance (common practice for large counts; the Poisson law's skewness 1/sqrt(mean) is
 * at most 0.32 here), and the normal deviates come from a table drawn once: a 24 MP
 * frame's noise then costs a few seconds, not half a minute. Bench data only.
 */
const NORMAL_ABOVE_ELECTRONS = 10;
/** Standard normal deviates drawn once; each frame's noise picks them at random (a table small enough to stay in the core's first cache). */
const NORMAL_TABLE_SIZE = 1 << 12;
let normalTable: Float64Array | undefined;

/** NORMAL_TABLE_SIZE standard normal deviates by the Box-Muller transform (Box and Muller 1958), from a seed of their own. */
function standardNormalTable(): Float64Array {
  if (normalTable) return normalTable;
  const rng = createRng(SCALE_SEED ^ 0x6a55);
  normalTable = new Float64Array(NORMAL_TABLE_SIZE);
  for (let i = 0; i < NORMAL_TABLE_SIZE; i++) normalTable[i] = sampleGaussian(rng);
  return normalTable;
}
const FRAME_INTERVAL_S = 1.5;
const CAPTURE_START_MS = Date.UTC(2027, 7, 2, 10, 3, 0);

export interface ScaleBracket {
  frames: number;
  size: ScaleSize;
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

/** One pass of the ladder: where the mount points and where the Moon stands while its exposures are taken. */
interface ScalePass {
  pass: number;
  pointing: { dx: number; dy: number; rotationDeg: number };
}

/** The plan every process making the frames shares: the ladder, the Sun's size, the Moon's drift and each pass's pointing. */
interface ScalePlan {
  size: ScaleSize;
  total: number;
  ladder: number[];
  sunRadiusPx: number;
  driftPx: { dx: number; dy: number };
  /** Each frame's own pointing jitter around its pass's, whole pixels up to this either way. */
  nudgePx: number;
  passes: ScalePass[];
}

function planScaleFrames(size: ScaleSize, total: number): ScalePlan {
  const sunRadiusPx = Math.round(Math.min(size.width, size.height) / 8);
  const scale = size.width / SCALE_WIDTH;
  // As the model's brackets do: each pass shifted up to 3 px (at the default size; in proportion at
  // others, as the same mount's jitter is at a finer plate scale) and turned up to 0.2 degrees. The Moon
  // moves 0.02 solar radii over the whole sequence: with its radius 1.045 times the Sun's
  // and its first offset 0.014 radii, it covers the Sun throughout (the model refuses
  // a frame that would leave the Sun uncovered).
  const rng = createRng(SCALE_SEED ^ 0x5eed);
  const jitterPx = 6 * scale;
  const drift = (0.02 / total) * sunRadiusPx;
  const passes: ScalePass[] = [];
  for (let pass = 0; pass * SCALE_LADDER_STEPS < total; pass++) {
    passes.push({ pass, pointing: { dx: (rng() - 0.5) * jitterPx, dy: (rng() - 0.5) * jitterPx, rotationDeg: (rng() - 0.5) * 0.4 } });
  }
  return { size, total, ladder: computeExposureLadder(SCALE_LADDER_STEPS), sunRadiusPx, driftPx: { dx: drift, dy: -drift / 3 }, nudgePx: Math.max(1, Math.round(scale)), passes };
}

/**
 * The light of one pass per second of exposure, times SUB_DN, without noise: the
 * model renders the pass's pointing and Moon (at its first frame) once, and every
 * exposure of the pass scales it.
 */
function renderPass(plan: ScalePlan, pass: ScalePass): Float32Array[] {
  const first = pass.pass * SCALE_LADDER_STEPS;
  const { frames } = synthesizeBracket({
    width: plan.size.width,
    height: plan.size.height,
    channels: 3,
    exposuresS: [SUB_DN],
    sunRadiusPx: plan.sunRadiusPx,
    seed: SCALE_SEED,
    shiftsPx: [{ dx: pass.pointing.dx, dy: pass.pointing.dy }],
    rotationsDeg: [pass.pointing.rotationDeg],
    // The model's default first offset of the Moon, moved on by this pass's place in the sequence.
    moonOffsetPx: { dx: 0.012 * plan.sunRadiusPx + first * plan.driftPx.dx, dy: -0.008 * plan.sunRadiusPx + first * plan.driftPx.dy },
    captureStartMs: CAPTURE_START_MS + first * FRAME_INTERVAL_S * 1000,
    noise: false,
    blackLevel: 0,
    whiteLevel: 2 ** 31,
  });
  return frames[0].planes;
}

/**
 * Frame `index` of its pass: the pass's light moved by the frame's own whole-pixel
 * nudge (edges repeated), times its exposure, with photon and read noise of its own.
 */
function exposeFrame(plan: ScalePlan, light: Float32Array[], index: number) {
  const { width, height } = plan.size;
  const exposureS = plan.ladder[index % SCALE_LADDER_STEPS];
  const rng = createRng((Math.imul(SCALE_SEED, 0x9e3779b1) + index * 0x85ebca6b + 1) >>> 0);
  const nx = Math.round((rng() * 2 - 1) * plan.nudgePx);
  const ny = Math.round((rng() * 2 - 1) * plan.nudgePx);
  const deviates = standardNormalTable();
  const gaussian = () => deviates[(rng() * NORMAL_TABLE_SIZE) | 0];
  const readElectrons2 = (READ_NOISE_DN * ELECTRONS_PER_DN) ** 2;
  const planes: Float32Array[] = [];
  for (const rate of light) {
    const plane = new Float32Array(width * height);
    for (let y = 0; y < height; y++) {
      const sy = Math.min(height - 1, Math.max(0, y - ny));
      for (let x = 0; x < width; x++) {
        const sx = Math.min(width - 1, Math.max(0, x - nx));
        const electrons = ((rate[sy * width + sx] * exposureS) / SUB_DN) * ELECTRONS_PER_DN;
        // Above NORMAL_ABOVE_ELECTRONS the photon count is drawn from the normal law of the same mean and variance, one deviate for it and the read noise together.
        const v =
          electrons < NORMAL_ABOVE_ELECTRONS
            ? Math.round(samplePoisson(rng, electrons) / ELECTRONS_PER_DN + READ_NOISE_DN * gaussian() + BLACK_DN)
            : Math.round((electrons + Math.sqrt(electrons + readElectrons2) * gaussian()) / ELECTRONS_PER_DN + BLACK_DN);
        plane[y * width + x] = v < 0 ? 0 : v > WHITE_DN ? WHITE_DN : v;
      }
    }
    planes.push(plane);
  }
  return { planes, exposureS, captureTimeMs: CAPTURE_START_MS + index * FRAME_INTERVAL_S * 1000, blackLevel: BLACK_DN, name: `scale-${String(index + 1).padStart(2, "0")}` };
}

/**
 * Makes and writes the frames of every pass numbered `share.index` modulo
 * `share.count` (all of them by default), one pass's light and one frame in memory
 * at a time. Returns each written frame's file and exposure by its index.
 */
export async function makeScaleFrames(dir: string, size: ScaleSize, total: number, share = { index: 0, count: 1 }, onFrame?: (index: number, frame: { file: string; exposureS: number }) => void): Promise<Map<number, { file: string; exposureS: number }>> {
  const plan = planScaleFrames(size, total);
  const written = new Map<number, { file: string; exposureS: number }>();
  for (const pass of plan.passes) {
    if (pass.pass % share.count !== share.index) continue;
    const light = renderPass(plan, pass);
    for (let index = pass.pass * SCALE_LADDER_STEPS; index < Math.min(total, (pass.pass + 1) * SCALE_LADDER_STEPS); index++) {
      const frame = exposeFrame(plan, light, index);
      const one: SynthBracket = { width: size.width, height: size.height, blackLevel: BLACK_DN, whiteLevel: WHITE_DN, frames: [frame], truth: {} };
      const [file] = await writeBracketFrames(one, dir, ["tiff"]);
      const made = { file: file.files.tiff!, exposureS: frame.exposureS };
      written.set(index, made);
      onFrame?.(index, made);
    }
  }
  return written;
}

/** The long bracket's frames: the issue's largest set, the ladder taken 22 times and two steps more. */
export const SCALE_LONG_FRAMES = 200;

/** The 81 frames, made once; later calls read the list from the cache. */
export async function prepareScaleBrackets(cacheRoot: string, size: ScaleSize, onFrame?: (done: number, total: number) => void): Promise<ScaleBrackets> {
  const total = frameCount(SCALE_PASSES[SCALE_PASSES.length - 1]);
  const made = await prepareScaleFrames(cacheRoot, size, total, onFrame);
  const brackets = SCALE_PASSES.map((passes) => {
    const n = frameCount(passes);
    return { frames: n, size, files: made.list.files.slice(0, n).map((f) => join(made.dir, f)), exposuresS: made.list.exposuresS.slice(0, n) };
  });
  return { dir: made.dir, brackets, madeS: made.madeS };
}

/** The long bracket of SCALE_LONG_FRAMES frames, made once into a folder of its own (its Moon drifts as far over 200 frames as the others' over 81). */
export async function prepareLongScaleBracket(cacheRoot: string, size: ScaleSize, onFrame?: (done: number, total: number) => void): Promise<ScaleBrackets> {
  const made = await prepareScaleFrames(cacheRoot, size, SCALE_LONG_FRAMES, onFrame);
  return { dir: made.dir, brackets: [{ frames: SCALE_LONG_FRAMES, size, files: made.list.files.map((f) => join(made.dir, f)), exposuresS: made.list.exposuresS }], madeS: made.madeS };
}

/** Processes that make a bracket's frames side by side (one per core of this machine's two). */
const MAKER_PROCESSES = 2;

async function prepareScaleFrames(cacheRoot: string, size: ScaleSize, total: number, onFrame?: (done: number, total: number) => void): Promise<{ dir: string; list: FrameList; madeS: number }> {
  const dir = join(cacheRoot, `bench-scale-${size.width}x${size.height}-${total}-seed${SCALE_SEED}-${SCALE_FRAMES_VERSION}`);
  const listPath = join(dir, "frames.json");
  if (existsSync(listPath)) return { dir, list: JSON.parse(readFileSync(listPath, "utf8")) as FrameList, madeS: 0 };
  const started = performance.now();
  mkdirSync(dir, { recursive: true });
  // Each child makes every MAKER_PROCESSES-th pass and prints one line per frame written.
  let done = 0;
  const made = new Map<number, { file: string; exposureS: number }>();
  await Promise.all(Array.from({ length: MAKER_PROCESSES }, (_, index) => new Promise<void>((resolve, reject) => {
    const child = spawn(process.execPath, ["--import", "tsx", join(import.meta.dirname, "scale-bracket-child.ts"), JSON.stringify({ dir, size, total, share: { index, count: MAKER_PROCESSES } })], { stdio: ["ignore", "pipe", "inherit"] });
    createInterface({ input: child.stdout }).on("line", (line) => {
      const frame = JSON.parse(line) as { index: number; file: string; exposureS: number };
      made.set(frame.index, { file: frame.file, exposureS: frame.exposureS });
      onFrame?.(++done, total);
    });
    child.on("error", reject);
    child.on("close", (code, signal) => (code === 0 ? resolve() : reject(new Error(`making the scale frames: process ${index + 1} of ${MAKER_PROCESSES} ended with ${signal ?? `exit code ${code}`}`))));
  })));
  const list: FrameList = { files: [], exposuresS: [] };
  for (let index = 0; index < total; index++) {
    const frame = made.get(index);
    if (!frame) throw new Error(`making the scale frames: frame ${index + 1} of ${total} was not written`);
    list.files.push(frame.file);
    list.exposuresS.push(frame.exposureS);
  }
  // Written last: its presence means the cache is complete.
  writeFileSync(listPath, JSON.stringify(list));
  return { dir, list, madeS: (performance.now() - started) / 1000 };
}
