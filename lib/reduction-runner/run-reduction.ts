// One reduction from files on disk to a finished output folder: decode (lib/media),
// reduce (lib/imaging, pure), write. Used by scripts/reduce.ts now and by the
// worker's reduction job later. Output goes to a staging folder that is renamed
// into place only when everything is written; on any failure it is removed, so
// a failed run leaves nothing behind and never touches an earlier reduction.
import { stat, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { finishMergedBracket, mergeKeptFramesInSteps } from "@/lib/imaging/bracket-finish";
import { finishMerge, type MergeAccumulator } from "@/lib/imaging/merge";
import { planBracketOnThreads } from "@/lib/imaging/bracket-plan";
import { prepareFrameWithLimb } from "@/lib/imaging/frame-stage";
import type { PreparedFrame, ReductionResult } from "@/lib/imaging/pipeline";
import { createSrgbDecodeTable } from "@/lib/imaging/srgb";
import type { LinearFrame } from "@/lib/imaging/types";
import { computeScaledSize, scaleImageLinear } from "@/lib/imaging/pyramid";
import { DEFAULT_REDUCTION_PARAMS, FILTER_STRENGTH_RANGE, type FrameCount, type PlaneImage, type ReductionParams } from "@/lib/imaging/types";
import { ReductionInputError } from "./errors";
import { writeMasterSummary } from "./master-summary";
import { checkFileList, decodeBracketFiles, type FrameProvenance } from "./decode-frames";
import { checkOverridesMatchFiles } from "./exposures-csv";
import { calibrateBracket, loadCalibrationMasters, type CalibrationReport } from "./calibration";
import { choosePreparedFrames, createFrameSpill, createRemadeFrames, remakePreparedOnRead, spillPrepared, type FrameSpill, type PreparedFramesChoice, type RemadeFrames } from "./frame-spill";
import { createPlanePool } from "./plane-pool";
import { createPreparePool, PREPARE_WORKERS, type PreparePool } from "./prepare-pool";
import { createWarpCache } from "./warp-cache";
import { lendRunnerMemory } from "@/lib/imaging/plane-runner";
import { commitStagedOutput, createStagedOutput, discardStagedOutput, type StagedOutput } from "./output-dir";
import type { HelioGeometry } from "./helio-wcs";
import type { SiteSpec } from "./sky-site";
import type { FrameSky } from "./sun-geometry";
import type { SunRegistration } from "./sun-registration";
import { buildReport, type ReductionReport } from "./report";
import { createHalvingCache, RENDITIONS, writeMasterFits, writePreview, writeRenditionPng, writeRenditionTiles, type RenditionName } from "./write-outputs";
import { applyClockOffsetToBracket, checkSkyOptions, resolveSkyGeometry, type RunnerRegistrationMode, type SkyOptions } from "./sky-run";
import type { TilePyramidResult } from "./tiles";

export type RunProgressFn = (stage: string, fraction: number, frames?: FrameCount) => void;

export interface RunReductionOptions {
  files: string[];
  outDir: string;
  params?: Partial<ReductionParams>;
  /** Exposure in seconds by file name; wins over the file's own value. */
  exposureOverrides?: Map<string, number>;
  /**
   * Capture times by file name, UTC milliseconds as the camera's clock showed them
   * (the clock offset still applies, as to times read from files); win over the file's own.
   */
  captureTimeOverrides?: Map<string, number>;
  /** Where the overrides came from (e.g. the CSV's name), for the report. */
  exposureOverrideSource?: string;
  /** URL the tiles folder will be served from; IIIF ids are built on it. */
  iiifBaseUrl?: string;
  /**
   * Long side of the renditions, preview and tiles in px: scaled down (in linear
   * light) when the master is larger; 0 or absent keeps full size. master.fits
   * always stays full size; the report states the scale.
   */
  outputLongSidePx?: number;
  /** Frame ids by file name (the base name of each entry of files), written into the report so pages can find each frame. */
  frameIds?: Record<string, string>;
  /**
   * "sun" aligns frames on the Sun's centre by the ephemeris (needs sky.site and
   * capture times); "moon" on the lunar limb; "corona" on the corona. Wins over
   * params.registration.
   */
  registration?: RunnerRegistrationMode;
  /** Observer site, camera clock offset and image orientation; with a site the master gets a helioprojective WCS. */
  sky?: SkyOptions;
  /**
   * Calibration frames on disk by kind (bias, dark, flat): combined into masters
   * (lib/imaging/calibrate.ts buildCalibrationMasters) and applied to every light
   * frame before anything else. Absent or empty lists: no calibration frames.
   */
  calibrationFiles?: { bias: string[]; dark: string[]; flat: string[] };
  onProgress?: RunProgressFn;
  /**
   * Keep each frame's pixels in a scratch folder on local disk between stages, so
   * that memory does not grow with the number of frames: "auto" (the default) does
   * when the files together exceed SPILL_ABOVE_FILE_BYTES.
   */
  spill?: "auto" | "always" | "never";
  /**
   * With frames kept on disk, where their prepared arrays (luminance, clipped and
   * noise-floor masks; about 6 bytes a pixel) live between stages: "on-disk" beside the
   * frames, "made-again" from each frame when a stage reads them (the same bits, more
   * CPU, no disk), or "auto" (the default): on disk when they take at most half of the
   * scratch folder's free space.
   */
  preparedFrames?: PreparedFramesChoice;
  /** Folder for that scratch data; default the system's temporary folder. */
  scratchDir?: string;
}

/** Brackets whose files together exceed this are reduced with their frames kept on disk between stages. */
export const SPILL_ABOVE_FILE_BYTES = 512 * 1024 ** 2;

async function openSpill(options: RunReductionOptions): Promise<FrameSpill | undefined> {
  const mode = options.spill ?? "auto";
  if (mode === "never") return undefined;
  if (mode === "auto") {
    let total = 0;
    for (const file of options.files) total += (await stat(file).catch(() => ({ size: 0 }))).size;
    if (total <= SPILL_ABOVE_FILE_BYTES) return undefined;
  }
  // No cache of recent arrays: every stage reads each frame's arrays once, in turn (the
  // registration keeps its own small source images of the frames it compares), so a
  // cache would only hold memory, up to a bracket's worth of frames beside the stage's own.
  return createFrameSpill({ parentDir: options.scratchDir, cacheBytes: 0 });
}

export interface RunReductionResult {
  outDir: string;
  report: ReductionReport;
  /** Where the frames lived between stages: for the bench and the command line's summary. */
  scratch: ScratchSummary;
}

export interface ScratchSummary {
  /** Frames kept in a scratch folder on local disk ("on-disk" prepared arrays beside them), or all in memory. */
  preparedFrames: "in-memory" | "on-disk" | "made-again";
  /** Bytes written to the scratch folder's frame files. */
  writtenBytes: number;
  /** Prepared frames made again from their frames ("made-again" only). */
  framesMadeAgain: number;
}

/** Refuses a filter strength or output size out of range before anything is decoded, naming the option. */
export function checkOutputOptions(params: ReductionParams, outputLongSidePx: number | undefined): void {
  const strength = params.filterStrength;
  if (strength !== undefined && !(typeof strength === "number" && strength >= FILTER_STRENGTH_RANGE.min && strength <= FILTER_STRENGTH_RANGE.max)) {
    throw new ReductionInputError("bad-option", `filterStrength: expected a number from ${FILTER_STRENGTH_RANGE.min} to ${FILTER_STRENGTH_RANGE.max}, got ${String(strength)}`);
  }
  if (outputLongSidePx !== undefined && !(Number.isInteger(outputLongSidePx) && (outputLongSidePx === 0 || (outputLongSidePx >= 64 && outputLongSidePx <= 65_536)))) {
    throw new ReductionInputError("bad-option", `outputLongSidePx: expected 0 (full size) or a whole number of pixels from 64 to 65536, got ${String(outputLongSidePx)}`);
  }
}

/** Lets the event loop run (a queue's lock renewal, progress writes) between pieces of numeric work. */
const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * The numeric core's stages in order, as reducePreparedBracket runs them, but
 * giving the event loop a turn after the plan and after every frame merged, so
 * that a worker's job lock is renewed during a long reduction. The plan's
 * registration compares its pairs in the pool's threads, and the pool is closed
 * as soon as the plan is made (the merge has no use for it).
 */
async function reduceInSteps(frames: LinearFrame[], prepared: readonly (PreparedFrame | undefined)[], params: ReductionParams, progress: RunProgressFn, spill: FrameSpill | undefined, pool: PreparePool, scratchDir?: string): Promise<ReductionResult> {
  let planned;
  try {
    planned = await planBracketOnThreads(frames, prepared, params, { onProgress: progress, keepPrepared: spill && ((p) => spillPrepared(spill, p)) }, (task) => pool.registerPair(task), PREPARE_WORKERS);
  } finally {
    await pool.close();
  }
  const { plan, ready } = planned;
  // The merge's bands and the renditions' per-pixel steps and blurs on both cores: this thread
  // and the pool's worker, with the same master and renditions as on this thread alone.
  const planes = createPlanePool();
  try {
    await planes.ready();
    const started = performance.now();
    // With frames on disk, their warped bands go there too between the merge's passes (the second reads instead of warping again).
    const cache = spill ? createWarpCache({ parentDir: scratchDir }) : undefined;
    // Each pass reads a frame's arrays once, straight into the pool's memory (so its threads take
    // them without a copy), and no cache holds them twice. What one frame's addition read is
    // handed back to the pool once it is added: nothing refers to it after that step.
    spill?.setCacheBytes(0);
    const { memory, giveBack } = lendRunnerMemory(planes);
    spill?.readInto(memory);
    let acc: MergeAccumulator;
    try {
      const steps = mergeKeptFramesInSteps(plan, frames, ready, progress, cache, planes);
      let step = steps.next();
      while (!step.done) {
        giveBack();
        await yieldToEventLoop();
        step = steps.next();
      }
      acc = step.value;
    } finally {
      spill?.readInto(undefined);
      giveBack();
      cache?.close();
    }
    // The merge's result, then its shared arrays given back (the accumulator's weights, the pilot,
    // the frame copies and band scratch) before the renditions make theirs.
    const merged = finishMerge(acc);
    planes.trim();
    return finishMergedBracket(plan, merged, progress, performance.now() - started, planes);
  } finally {
    await planes.close();
  }
}

/**
 * prepareFrame of every frame (the pipeline's first stage) in the pool's worker
 * threads, two frames in flight so that only those are copied at a time (a
 * spilled frame's planes are read by the worker from their files). A frame the
 * pool could not do stays undefined, and the pipeline prepares it itself.
 */
async function prepareFramesInPool(pool: PreparePool, frames: LinearFrame[], params: ReductionParams, progress: RunProgressFn, spill: FrameSpill | undefined, remade: RemadeFrames | undefined): Promise<(PreparedFrame | undefined)[]> {
  progress("linearize", 0);
  const keep = (frame: LinearFrame, ready: PreparedFrame): PreparedFrame => {
    if (remade) {
      const table = frame.encoding === "srgb8" ? createSrgbDecodeTable() : undefined;
      // The pool's prepareFrame linearized with these same arguments; the limb it fitted is kept.
      return remakePreparedOnRead(ready, () => prepareFrameWithLimb(frame, params, ready.limb, table), remade);
    }
    return spill ? spillPrepared(spill, ready) : ready;
  };
  const prepared: (PreparedFrame | undefined)[] = new Array(frames.length).fill(undefined);
  let next = 0;
  let done = 0;
  const lanes = Array.from({ length: Math.min(PREPARE_WORKERS, frames.length) }, async () => {
    while (next < frames.length) {
      const k = next++;
      const ready = await pool.prepare(frames[k], params, spill?.filesOf(frames[k].image, "planes"));
      prepared[k] = ready && keep(frames[k], ready);
      done++;
      progress("limb", done / frames.length, { done, total: frames.length });
    }
  });
  await Promise.all(lanes);
  return prepared;
}

export async function runReductionOnFiles(options: RunReductionOptions): Promise<RunReductionResult> {
  const started = performance.now();
  const params: ReductionParams = { ...DEFAULT_REDUCTION_PARAMS, ...options.params };
  const askedMode: RunnerRegistrationMode = options.registration ?? params.registration;
  const overrides = options.exposureOverrides ?? new Map<string, number>();
  checkFileList(options.files);
  checkSkyOptions(askedMode, options.sky);
  checkOverridesMatchFiles(overrides, options.files, options.exposureOverrideSource);
  checkOutputOptions(params, options.outputLongSidePx);
  const outputLongSidePx = options.outputLongSidePx ?? 0;
  const progress: RunProgressFn = (stage, fraction, frames) => options.onProgress?.(stage, Math.min(1, Math.max(0, fraction)), frames);
  const timingsMs: Record<string, number> = {};
  let clock = performance.now();
  const lap = (stage: string) => {
    const now = performance.now();
    timingsMs[stage] = now - clock;
    clock = now;
  };

  const output = await createStagedOutput(options.outDir);
  const spill = await openSpill(options);
  try {
    progress("decode", 0);
    // Two worker threads decode the frames and search each for the bracket's defects;
    // once the bracket is calibrated (or its defects masked), they linearize and fit
    // the limbs, and the sky geometry and the pipeline take those results as their own
    // first steps would have made them. Both cores work in both.
    const masters = await loadCalibrationMasters(options.calibrationFiles, overrides);
    const pool = createPreparePool();
    let frames: LinearFrame[];
    let provenance: FrameProvenance[];
    let calibration: CalibrationReport;
    let sky: ReturnType<typeof resolveSkyGeometry>;
    let prepared: (PreparedFrame | undefined)[];
    let remade: RemadeFrames | undefined;
    try {
      const decodedBracket = await decodeBracketFiles(options.files, overrides, (f) => progress("decode", f, { done: Math.round(f * options.files.length), total: options.files.length }), { pool, findOutliers: !masters }, options.captureTimeOverrides, spill);
      ({ frames, provenance } = decodedBracket);
      calibration = calibrateBracket(frames, masters, spill && ((frame) => spill.spillField(frame.image, "planes")), decodedBracket.outliers);
      applyClockOffsetToBracket(frames, provenance, options.sky?.clockOffsetS ?? 0);
      lap("decode");

      remade = spill && choosePreparedFrames(options.preparedFrames ?? "auto", frames.map((f, k) => ({ width: f.image.width, height: f.image.height, encoding: f.encoding, planeCount: provenance[k]?.planeCount ?? 3 })), options.scratchDir ?? tmpdir()) === "made-again" ? createRemadeFrames() : undefined;
      prepared = await prepareFramesInPool(pool, frames, params, progress, spill, remade);
      lap("linearize-and-limb");

      progress("sky", 0);
      // The Sun's registration measures the plate scale and the orientation on the same prepared frames.
      sky = resolveSkyGeometry(frames, params, askedMode, options.sky, prepared.every((p) => p !== undefined) ? (prepared as PreparedFrame[]) : undefined);
      if (sky.sun) lap("sky-geometry");
      // Frames prepared with another clip fraction than the pipeline's would not be its own (the sky keeps it, so far).
      if (sky.pipelineParams.clipFraction !== params.clipFraction) prepared = [];
    } catch (error) {
      await pool.close();
      throw error;
    }
    const registrationMode = sky.registrationMode;
    // The pool has reported the frames prepared; the pipeline's first stage, which only takes them
    // (or prepares the few a worker could not), would count them again from one.
    const pipelineProgress: RunProgressFn = (stage, fraction, count) => {
      if (stage !== "linearize" && stage !== "limb") progress(stage, fraction, count);
    };
    // The pool's threads compare the registration's pairs too; reduceInSteps closes it after the plan.
    const result = await reduceInSteps(frames, prepared, sky.pipelineParams, pipelineProgress, spill, pool, options.scratchDir);
    const scratch: ScratchSummary = {
      preparedFrames: !spill ? "in-memory" : remade ? "made-again" : "on-disk",
      writtenBytes: spill?.stats().writtenBytes ?? 0,
      framesMadeAgain: remade?.stats().made ?? 0,
    };
    spill?.close();
    remade?.clear();
    prepared.length = 0;
    const helio = sky.completeGeometry(result);
    // The pipeline's own stage times (added to the pool's preparation, which the pipeline's first stage then skips).
    for (const [stage, ms] of Object.entries(result.overall.timingsMs)) timingsMs[stage] = (timingsMs[stage] ?? 0) + ms;
    lap("reduce");
    frames.length = 0; // the decoded frames are no longer needed; let them go before writing

    const report = await writeReductionOutputs(output, {
      result, provenance, helio, registrationMode, calibration, timingsMs, started,
      exposureOverrideSource: options.exposureOverrideSource, outputLongSidePx, iiifBaseUrl: options.iiifBaseUrl, frameIds: options.frameIds,
      notes: sky.notes, clockOffsetS: options.sky?.clockOffsetS ?? 0, site: options.sky?.site, skies: sky.skies, sun: sky.sun,
    }, progress);
    await commitStagedOutput(output);
    progress("done", 1);
    return { outDir: output.finalDir, report, scratch };
  } catch (error) {
    await discardStagedOutput(output);
    throw error;
  } finally {
    spill?.close();
  }
}

/** What the writing of a finished reduction needs besides the numeric result. */
export interface ReductionOutputsInput {
  result: ReductionResult;
  provenance: FrameProvenance[];
  helio: HelioGeometry | undefined;
  registrationMode: RunnerRegistrationMode;
  calibration: CalibrationReport;
  /** Stage times so far; the writers' own are added. */
  timingsMs: Record<string, number>;
  /** performance.now() when the reduction started, for the total. */
  started: number;
  exposureOverrideSource?: string;
  outputLongSidePx: number;
  iiifBaseUrl?: string;
  frameIds?: Record<string, string>;
  notes: string[];
  clockOffsetS: number;
  site?: SiteSpec;
  skies?: FrameSky[];
  sun?: SunRegistration;
}

/**
 * Writes a finished reduction into its staging folder: master.fits, both
 * renditions as PNG, previews, both tile pyramids, the summary and report.json.
 * Returns the report. Shared by the single-process run and the flow's last step.
 */
export async function writeReductionOutputs(output: StagedOutput, input: ReductionOutputsInput, progress: RunProgressFn): Promise<ReductionReport> {
  const { result, provenance, helio, registrationMode, calibration, timingsMs, outputLongSidePx } = input;
  let clock = performance.now();
  const lap = (stage: string) => {
    const now = performance.now();
    timingsMs[stage] = now - clock;
    clock = now;
  };
  const dir = output.stagingDir;
  const createdMs = Date.now();
  progress("write-master", 0);
  await writeMasterFits(dir, {
    result,
    frames: provenance.map((p) => ({ name: p.name, exposureS: p.exposureS, exposureSource: p.exposureSource === "override" ? (input.exposureOverrideSource ?? "override") : p.exposureSource, captureTimeMs: p.captureTimeMs })),
    encoding: provenance[0].bitDepth === 8 ? "srgb8" : "linear",
    instrument: provenance[0].instrument,
    createdMs,
    registrationMode,
    helio,
  });
  lap("write-master");

  // PNGs, preview and both tile pyramids are written side by side: sharp encodes on
  // its own threads while this thread quantizes and halves the next piece, and the
  // preview and the tiles share their linear-light halvings. The two stage times
  // overlap: each runs from the start of this phase to the end of its own writes.
  progress("write-renditions", 0);
  const halve = createHalvingCache();
  const size = computeScaledSize(result.master.width, result.master.height, outputLongSidePx);
  const renditions: Record<RenditionName, PlaneImage> = {
    natural: size.scale === 1 ? result.natural : scaleImageLinear(result.natural, size.width, size.height, halve),
    structure: size.scale === 1 ? result.structure : scaleImageLinear(result.structure, size.width, size.height, halve),
  };
  const writesStarted = performance.now();
  const renditionsWritten = (async () => {
    await Promise.all(RENDITIONS.map((name) => writeRenditionPng(dir, name, renditions[name])));
    await writePreview(dir, renditions.natural, halve);
    await writePreview(dir, renditions.structure, halve, "preview-structure.jpg");
    timingsMs["write-renditions"] = performance.now() - writesStarted;
  })();
  const tiles: Record<string, TilePyramidResult> = {};
  const levelsDone = new Map<RenditionName, number>();
  const tilesWritten = Promise.all(RENDITIONS.map(async (name) => {
    tiles[name] = await writeRenditionTiles(dir, output.finalDir, name, renditions[name], input.iiifBaseUrl, (done, total) => {
      levelsDone.set(name, done / total);
      progress("tiles", [...levelsDone.values()].reduce((sum, f) => sum + f, 0) / RENDITIONS.length);
    }, halve);
  })).then(() => {
    timingsMs.tiles = performance.now() - writesStarted;
  });
  await Promise.all([renditionsWritten, tilesWritten]);
  clock = performance.now();

  progress("summary", 0);
  const summary = await writeMasterSummary(dir, result, helio);
  lap("summary");

  timingsMs.total = performance.now() - input.started;
  const report = buildReport({ result, provenance, exposureOverrideSource: input.exposureOverrideSource, timingsMs, tiles, createdMs, summary, frameIds: input.frameIds, notes: input.notes, calibration,
    renditionSize: { width: size.width, height: size.height, scale: size.scale, longSidePx: outputLongSidePx },
    sky: { registrationMode, clockOffsetS: input.clockOffsetS, site: input.site, skies: input.skies, sun: input.sun, helio },
  });
  await writeFile(join(dir, "report.json"), `${JSON.stringify(report, null, 2)}\n`);
  return report;
}
