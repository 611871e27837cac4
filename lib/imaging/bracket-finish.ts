// The merge and the finish of a reduction: merge passes over any slice of the
// kept frames (the accumulators of slices combine, see merge.ts), then the
// master, its renditions and the per-frame report from the plan.
import { type PreparedFrame, describeMergeFrame, listFrameWarpArrays, openFrameWarp, warpFrameBand, warpFramePoints } from "./frame-stage";
import { describeTransmission, RELEASED_PLANE, type BracketPlan } from "./bracket-plan";
import { ImagingError } from "./errors";
import { linearizeFrame } from "./linearize";
import { addBandToMerge, closeMergeFrame, createMergeAccumulator, createMergeTally, finishMerge, listMergeArrays, listScoreSamplePixels, sampleScorePoints, settleScoreScale, toPilot, type MergeAccumulator, type MergeFrameInput, type MergeFrameTally, type MergeResult, type PhotonPilot } from "./merge";
import { foldRowTallies, WARP_MERGE_ROWS, type WarpMergeArgs } from "./merge-kernels";
import type { WarpTarget } from "./resample";
import { createCodeLookup } from "./response";
import { inRunnerMemory, SERIAL_PLANE_RUNNER, type PlaneRunner } from "./plane-runner";
import { applyAffine, fromAffine } from "./similarity";
import { renderMasterRenditions } from "./renditions";
import type { FrameCount, LinearFrame, PlaneImage } from "./types";
import { PIPELINE_VERSION } from "./version";
import type { ReductionResult } from "./pipeline";

/**
 * An empty accumulator for one merge pass of the plan's frames: 8-bit frames
 * merge once with the camera response; linear frames twice, the second pass
 * with the first's result as its pilot (weights and outlier test).
 */
export function createMergePass(plan: BracketPlan, pilot?: PhotonPilot, runner?: PlaneRunner): MergeAccumulator {
  const { width, height, channels } = plan;
  if (plan.isEncoded) return createMergeAccumulator(width, height, channels, "debevec-hat", createCodeLookup(plan.responseTable!));
  return createMergeAccumulator(width, height, channels, "photon", undefined, pilot, runner);
}

/**
 * Master rows a linear frame is warped and merged in at a time: at 6000 px wide a
 * band's planes take 18 MB where a whole frame's took 288 (and the merge's
 * per-frame scratch shrinks alike). 8-bit frames merge whole.
 */
export const MERGE_BAND_ROWS = 256;

function mergeBandRows(plan: BracketPlan): number {
  return plan.isEncoded ? plan.height : Math.min(plan.height, MERGE_BAND_ROWS);
}

/**
 * Warp buffers that serve every frame of a pass in turn: planes and covered for
 * one band, masks [0] and [1] of the frame's size (the clipped mask's widening),
 * masks [2] to [4] for one band (the warped clipped, noise-floor and defect masks).
 * The band's rows decide how addKeptFrame cuts each frame (8-bit frames: always whole).
 */
export function createWarpScratch(plan: BracketPlan, bandRows = mergeBandRows(plan)): WarpTarget {
  const n = plan.width * plan.height;
  const band = plan.width * (plan.isEncoded ? plan.height : Math.max(1, Math.min(plan.height, Math.floor(bandRows))));
  return {
    planes: Array.from({ length: plan.channels }, () => new Float32Array(band)),
    covered: new Uint8Array(band),
    masks: [new Uint8Array(n), new Uint8Array(n), new Uint8Array(band), new Uint8Array(band), new Uint8Array(band)],
  };
}

/**
 * Where a reduction keeps each linear frame's warped bands between the merge's
 * two passes, so that the second pass reads them instead of opening and warping
 * the frame again: the same arrays, so the same merge bit for bit, for a read of
 * about 13 bytes a master pixel (three planes and the masks) instead of the
 * frame's read, defect repair, mask widening and warp. Keyed by the frame's
 * position in plan.keep and a part number (0 the score sample's pixels, then the
 * bands in order). lib/reduction-runner/warp-cache.ts keeps them on local disk.
 */
export interface WarpCache {
  /** Makes room for a frame's parts (bytes in all); false when there is none (the second pass then warps the frame again). */
  reserve: (position: number, bytes: number) => boolean;
  /**
   * Keeps one part of a frame that has room; false when it could not (the disk
   * refused, say): the frame's parts are then all let go, and the second pass
   * warps it again.
   */
  put: (position: number, part: number, arrays: (Float32Array | Uint8Array)[]) => boolean;
  /**
   * Reads one part into `into` (arrays as long as those put, or longer, of the same
   * kinds) and lets it go; gives each array's length as put, or undefined when the
   * part was not kept.
   */
  take: (position: number, part: number, into: (Float32Array | Uint8Array)[]) => number[] | undefined;
}

/** A band's (or sample's) arrays as a warp cache keeps them; a frame without defects keeps an empty defect mask. */
function cachedArraysOf(input: MergeFrameInput): (Float32Array | Uint8Array)[] {
  return [...input.planes, input.covered!, input.clipped, input.noiseFloor, input.masked ?? new Uint8Array(0)];
}

/** Reads a cached part into `into` (as cachedArraysOf lays it out): the merge input, or undefined when not kept. */
function takeCached(cache: WarpCache, position: number, part: number, into: (Float32Array | Uint8Array)[], channels: number, scalars: ReturnType<typeof describeMergeFrame>): MergeFrameInput | undefined {
  const lengths = cache.take(position, part, into);
  if (!lengths) return undefined;
  const view = <T extends Float32Array | Uint8Array>(j: number) => into[j].subarray(0, lengths[j]) as T;
  return {
    planes: Array.from({ length: channels }, (_, c) => view<Float32Array>(c)),
    covered: view<Uint8Array>(channels), clipped: view<Uint8Array>(channels + 1), noiseFloor: view<Uint8Array>(channels + 2),
    masked: lengths[channels + 3] > 0 ? view<Uint8Array>(channels + 3) : undefined,
    ...scalars,
  };
}

/** The second pass's addition of a frame whose parts the first pass kept; false (nothing added) when it kept none. */
function addCachedFrame(plan: BracketPlan, acc: MergeAccumulator, position: number, prepared: PreparedFrame, scratch: WarpTarget, cache: WarpCache, tally: MergeFrameTally): boolean {
  const { width, height, channels } = plan;
  const scalars = describeMergeFrame(prepared, plan.effectiveExposuresS[position]);
  const pixels = listScoreSamplePixels(acc);
  const m = pixels.length;
  const sample = takeCached(cache, position, 0, [...Array.from({ length: channels }, () => new Float32Array(m)), ...Array.from({ length: 4 }, () => new Uint8Array(m))], channels, scalars);
  if (!sample) return false;
  sampleScorePoints(acc, sample, pixels, tally);
  const masks = scratch.masks!;
  const into = [...scratch.planes, scratch.covered, masks[2], masks[3], masks[4]];
  const rows = bandRowsOf(scratch, plan);
  for (let y = 0, part = 1; y < height; y += rows, part++) {
    const band = takeCached(cache, position, part, into, channels, scalars);
    if (!band) throw new ImagingError("bad-parameter", `the merge's cache lost part ${part} of frame ${position + 1}`);
    addBandToMerge(acc, band, y * width, tally);
  }
  return true;
}

/** Master rows per band for a warp scratch (see createWarpScratch). */
function bandRowsOf(scratch: WarpTarget, plan: BracketPlan): number {
  return Math.max(1, Math.floor(Math.min(scratch.covered.length / plan.width, plan.height)));
}

/**
 * Warps a kept frame into master pixels and adds it to a pass, band by band
 * (the second pass first samples its outlier scale at the sampled pixels; the
 * result is the whole-frame addition's, bit for bit). `position` is the frame's
 * place in plan.keep; frames must come in that order within a pass (slices of
 * consecutive positions, each into its own accumulator, combine). With a cache,
 * the first pass keeps the frame's warped bands (where the cache has room) and
 * the second pass reads them instead of warping again.
 */
export function addKeptFrame(plan: BracketPlan, acc: MergeAccumulator, position: number, frame: LinearFrame, prepared: PreparedFrame, scratch: WarpTarget, cache?: WarpCache): void {
  const k = plan.keep[position];
  const offset = plan.offsets[k];
  const { width, height, channels } = plan;
  const masks = scratch.masks && scratch.masks.length >= 5 ? scratch.masks : undefined;
  const tally = createMergeTally();
  const usesCache = Boolean(cache && masks && !plan.isEncoded);
  if (usesCache && acc.pilot && addCachedFrame(plan, acc, position, prepared, scratch, cache!, tally)) {
    closeMergeFrame(acc, tally);
    return;
  }
  // The merge subtracts the offset the plan settled on (solved from the bracket, when the file had none).
  const settled: LinearFrame = offset.blackLevel === frame.blackLevel ? frame : { ...frame, blackLevel: offset.blackLevel, blackLevelSource: offset.blackLevelSource };
  const warp = openFrameWarp(settled, prepared, plan.registration[position].masterToFrame, plan.moons[position], plan.referenceMoon, masks?.slice(0, 2), plan.effectiveExposuresS[position]);
  try {
    const rows = bandRowsOf(scratch, plan);
    const band = { planes: scratch.planes, covered: scratch.covered, masks: masks?.slice(2) };
    const pixels = listScoreSamplePixels(acc);
    // First pass with a cache: the frame's parts are kept when there is room for all of them.
    let keeps = usesCache && !acc.pilot && cache!.reserve(position, (pixels.length + width * height) * (4 * channels + 4));
    if (acc.pilot || keeps) {
      // The outlier scale's sample, from the sampled pixels alone (not a warp of every band).
      const sample = warpFramePoints(warp, pixels);
      if (keeps) keeps = cache!.put(position, 0, cachedArraysOf(sample));
      else sampleScorePoints(acc, sample, pixels, tally);
    }
    for (let y = 0, part = 1; y < height; y += rows, part++) {
      const input = warpFrameBand(warp, y, Math.min(height, y + rows), band);
      if (keeps) keeps = cache!.put(position, part, cachedArraysOf(input));
      addBandToMerge(acc, input, y * width, tally);
    }
    closeMergeFrame(acc, tally);
  } finally {
    warp.release();
  }
}

/**
 * What addKeptFrameOnRunner works in, from the runner's memory, reused frame after
 * frame: the band's arrays and its rows' figures (WarpMergeArgs), and two masks of
 * the frame's size for the clipped mask's widening.
 */
export interface RowWarpScratch {
  band: Pick<WarpMergeArgs, "planes" | "covered" | "clipped" | "noiseFloor" | "masked" | "rowWeight" | "rowCounts" | "candidateScore" | "candidateWeight" | "candidateWell" | "candidateContribution">;
  dilation: Uint8Array[];
  rows: number;
}

export function createRowWarpScratch(plan: BracketPlan, runner: PlaneRunner, bandRows = MERGE_BAND_ROWS): RowWarpScratch {
  const rows = Math.max(1, Math.min(plan.height, Math.floor(bandRows)));
  const n = rows * plan.width;
  const planes = () => Array.from({ length: plan.channels }, () => runner.float32(n));
  return {
    rows,
    dilation: [runner.uint8(plan.width * plan.height), runner.uint8(plan.width * plan.height)],
    band: {
      planes: planes(), covered: runner.uint8(n), clipped: runner.uint8(n), noiseFloor: runner.uint8(n), masked: runner.uint8(n),
      rowWeight: runner.float64(rows), rowCounts: new Int32Array(runner.float32(4 * rows).buffer),
      candidateScore: runner.float32(n), candidateWeight: runner.float32(n), candidateWell: runner.uint8(n), candidateContribution: planes(),
    },
  };
}

/** Gives a row scratch's memory back to its runner. */
export function releaseRowWarpScratch(scratch: RowWarpScratch, runner: PlaneRunner): void {
  const { band } = scratch;
  runner.release(...scratch.dilation, ...band.planes, band.covered, band.clipped, band.noiseFloor, band.masked, band.rowWeight, new Float32Array(band.rowCounts.buffer),
    band.candidateScore, band.candidateWeight, band.candidateWell, ...band.candidateContribution);
}

/**
 * addKeptFrame for a linear frame with its bands' rows shared out among a
 * runner's threads (WARP_MERGE_ROWS), on an accumulator made with the same
 * runner (createMergePass): the frame's arrays are copied into the runner's
 * memory when they are not there. Every master pixel is the serial addition's,
 * bit for bit; the frame's weight sum adds row by row (its last bits may differ
 * from the serial sum's). The warp cache is used as addKeptFrame uses it.
 */
export function addKeptFrameOnRunner(plan: BracketPlan, acc: MergeAccumulator, position: number, frame: LinearFrame, prepared: PreparedFrame, scratch: RowWarpScratch, runner: PlaneRunner, cache?: WarpCache): void {
  if (plan.isEncoded) throw new ImagingError("bad-parameter", "8-bit frames merge whole, on one thread");
  const k = plan.keep[position];
  const offset = plan.offsets[k];
  const { width, height, channels } = plan;
  const { band } = scratch;
  const tally = createMergeTally();
  const scalars = describeMergeFrame(prepared, plan.effectiveExposuresS[position]);
  const pixels = listScoreSamplePixels(acc);
  const args = (y0: number): WarpMergeArgs => ({
    ...listMergeArrays(acc), ...band, y0, warps: false, exposureS: scalars.exposureS, clipLevel: scalars.clipLevel,
    noiseSigma: scalars.noiseSigma ?? NaN, scale: settleScoreScale(acc, tally) ?? NaN, hasMasked: false,
  });
  const addRows = (step: WarpMergeArgs, y0: number) => {
    const rows = Math.min(scratch.rows, height - y0);
    runner.run(WARP_MERGE_ROWS, step, rows);
    foldRowTallies(step, rows, tally);
    return rows * width;
  };
  // Second pass over a frame the first pass kept: its sample and bands from the cache.
  if (cache && acc.pilot) {
    const into = [...band.planes, band.covered, band.clipped, band.noiseFloor, band.masked];
    const m = pixels.length;
    const sample = takeCached(cache, position, 0, [...Array.from({ length: channels }, () => new Float32Array(m)), ...Array.from({ length: 4 }, () => new Uint8Array(m))], channels, scalars);
    if (sample) {
      sampleScorePoints(acc, sample, pixels, tally);
      for (let y = 0, part = 1; y < height; y += scratch.rows, part++) {
        const lengths = cache.take(position, part, into);
        if (!lengths) throw new ImagingError("bad-parameter", `the merge's cache lost part ${part} of frame ${position + 1}`);
        addRows({ ...args(y), hasMasked: lengths[channels + 3] > 0 }, y);
      }
      closeMergeFrame(acc, tally);
      return;
    }
  }
  const settled: LinearFrame = offset.blackLevel === frame.blackLevel ? frame : { ...frame, blackLevel: offset.blackLevel, blackLevelSource: offset.blackLevelSource };
  const copies: (Float32Array | Uint8Array)[] = [];
  const place = <T extends Float32Array | Uint8Array>(array: T): T => {
    const shared = inRunnerMemory(runner, array);
    if (shared.copied) copies.push(shared.array);
    return shared.array;
  };
  const warp = openFrameWarp(settled, prepared, plan.registration[position].masterToFrame, plan.moons[position], plan.referenceMoon, scratch.dilation, plan.effectiveExposuresS[position], place);
  try {
    let keeps = Boolean(cache) && !acc.pilot && cache!.reserve(position, (pixels.length + width * height) * (4 * channels + 4));
    if (acc.pilot || keeps) {
      const sample = warpFramePoints(warp, pixels);
      if (keeps) keeps = cache!.put(position, 0, cachedArraysOf(sample));
      else sampleScorePoints(acc, sample, pixels, tally);
    }
    const source = listFrameWarpArrays(warp);
    const hasMasked = Boolean(source.sourceMasked);
    for (let y = 0, part = 1; y < height; y += scratch.rows, part++) {
      const n = addRows({ ...args(y), ...source, warps: true, hasMasked }, y);
      if (keeps) {
        const view = <T extends Float32Array | Uint8Array>(a: T) => a.subarray(0, n) as T;
        keeps = cache!.put(position, part, [...band.planes.map(view), view(band.covered), view(band.clipped), view(band.noiseFloor), hasMasked ? view(band.masked) : new Uint8Array(0)]);
      }
    }
    closeMergeFrame(acc, tally);
  } finally {
    warp.release();
    runner.release(...copies);
  }
}

/**
 * A kept frame's prepared data as the merge uses it, made again from the frame
 * and the plan alone (what planBracket hands its caller as `ready`): for linear
 * frames the linearization with the offset the plan settled on, for 8-bit frames
 * with the response it chose. Lets another process merge a slice of frames
 * without the plan's prepared frames.
 */
export function prepareKeptFrame(plan: BracketPlan, position: number, frame: LinearFrame): PreparedFrame {
  const k = plan.keep[position];
  const limb = plan.limbs[position];
  const { clipFraction } = plan.params;
  if (plan.isEncoded) {
    const linear = linearizeFrame(frame, clipFraction, { responseTable: plan.responseTable, keepPlanes: true });
    return { linear, luminance: RELEASED_PLANE, limb };
  }
  const offset = plan.offsets[k];
  const settled: LinearFrame = { ...frame, blackLevel: offset.blackLevel, blackLevelSource: offset.blackLevelSource };
  const linear = linearizeFrame(settled, clipFraction, { keepPlanes: false });
  return { linear, luminance: RELEASED_PLANE, limb };
}

/**
 * Both passes (one for 8-bit frames) over every kept frame, one frame a step:
 * the generator yields after each frame and returns the last pass's
 * accumulator, so that a caller may give its event loop a turn between frames.
 * With a cache, the second pass reads the frames the first pass warped.
 */
/** Adds a plan's kept frames to merge passes, with its scratch; release gives the scratch back. */
export interface KeptFrameAdder {
  add: (acc: MergeAccumulator, position: number, frame: LinearFrame, prepared: PreparedFrame, cache?: WarpCache) => void;
  release: () => void;
}

/**
 * The one choice of how kept frames are added: linear frames with a runner on its
 * threads (addKeptFrameOnRunner, into accumulators made with the same runner),
 * else on this thread (addKeptFrame). The same master either way, bit for bit.
 */
export function createKeptFrameAdder(plan: BracketPlan, runner?: PlaneRunner): KeptFrameAdder {
  if (runner && !plan.isEncoded) {
    let rows: RowWarpScratch | undefined = createRowWarpScratch(plan, runner);
    return {
      add: (acc, position, frame, prepared, cache) => addKeptFrameOnRunner(plan, acc, position, frame, prepared, rows!, runner, cache),
      release: () => {
        if (rows) releaseRowWarpScratch(rows, runner);
        rows = undefined;
      },
    };
  }
  // Let go on release (the caller may outlive the passes), so the finish has the memory.
  let scratch: WarpTarget | undefined = createWarpScratch(plan);
  return {
    add: (acc, position, frame, prepared, cache) => addKeptFrame(plan, acc, position, frame, prepared, scratch!, cache),
    release: () => {
      scratch = undefined;
    },
  };
}

export function* mergeKeptFramesInSteps(plan: BracketPlan, frames: LinearFrame[], ready: PreparedFrame[], onProgress?: (stage: string, fraction: number, frames?: FrameCount) => void, cache?: WarpCache, runner?: PlaneRunner): Generator<void, MergeAccumulator, void> {
  const adder = createKeptFrameAdder(plan, runner);
  const total = plan.keep.length;
  function* pass(acc: MergeAccumulator, stage: string): Generator<void, MergeAccumulator, void> {
    // Said as the pass starts, so that the first frame's merge is counted as the merge's (not the stage before).
    onProgress?.(stage, 0, { done: 0, total });
    for (let i = 0; i < total; i++) {
      adder.add(acc, i, frames[plan.keep[i]], ready[i], cache);
      onProgress?.(stage, (i + 1) / total, { done: i + 1, total });
      yield;
    }
    return acc;
  }
  let last: MergeAccumulator;
  if (plan.isEncoded) last = yield* pass(createMergePass(plan), "merge");
  else {
    // Only the pilot of the first pass is kept: its weights, coverage and scratch go before the second pass starts.
    const pilot = toPilot(yield* pass(createMergePass(plan, undefined, runner), "merge-pilot"), runner);
    last = yield* pass(createMergePass(plan, pilot, runner), "merge");
  }
  adder.release();
  return last;
}

/** mergeKeptFramesInSteps run to its end. */
export function mergeKeptFrames(plan: BracketPlan, frames: LinearFrame[], ready: PreparedFrame[], onProgress?: (stage: string, fraction: number, frames?: FrameCount) => void): MergeAccumulator {
  const steps = mergeKeptFramesInSteps(plan, frames, ready, onProgress);
  for (;;) {
    const step = steps.next();
    if (step.done) return step.value;
  }
}

/** Master pixels no frame gave any light to (coverage 0 and radiance exactly 0: every frame masked there); undefined when none. */
function findEmptyPixels(merged: MergeResult): Uint8Array | undefined {
  const n = merged.width * merged.height;
  let holes: Uint8Array | undefined;
  const planes = merged.radiance;
  for (let i = 0; i < n; i++) {
    if (merged.coverage[i] !== 0) continue;
    let lit = false;
    for (let c = 0; c < planes.length && !lit; c++) lit = planes[c][i] !== 0;
    if (lit) continue;
    holes ??= new Uint8Array(n);
    holes[i] = 1;
  }
  return holes;
}

/** The master, its renditions and the report of each frame, from a finished plan and its last merge pass. */
export function finishBracket(plan: BracketPlan, acc: MergeAccumulator, onProgress?: (stage: string, fraction: number) => void, mergeMs = 0, runner?: PlaneRunner): ReductionResult {
  const started = performance.now();
  // finishMerge consumes the accumulator: its buffers are free from here on.
  const merged = finishMerge(acc);
  return finishMergedBracket(plan, merged, onProgress, mergeMs + (performance.now() - started), runner);
}

/**
 * finishBracket from the merge's result (finishMerge's): the renditions and the
 * report. Reports progress "renditions" at 0, at 0.5 when the structure
 * rendition is done and the natural one starts, and at 1. A runner spreads the
 * renditions' per-pixel steps and blurs over its threads: the same renditions
 * and figures bit for bit, with the working planes and the renditions in its
 * shared memory (no plane more than without it).
 */
export function finishMergedBracket(plan: BracketPlan, merged: MergeResult, onProgress?: (stage: string, fraction: number) => void, mergeMs = 0, runner: PlaneRunner = SERIAL_PLANE_RUNNER): ReductionResult {
  const clock = performance.now();
  const progress = (stage: string, fraction: number) => onProgress?.(stage, fraction);
  const { width, height, params, referenceMoon, ref, keep } = plan;
  const isEncoded = plan.isEncoded;
  const offsets = params.moonMinusSunPx;
  const timingsMs: Record<string, number> = { ...plan.timingsMs };
  const master: PlaneImage = { width, height, planes: merged.radiance };
  timingsMs["warp-and-merge"] = mergeMs;
  // The master keeps its empty pixels (every frame's defect there); the renditions show them
  // filled from their neighbours (renditions.ts).
  const holes = findEmptyPixels(merged);

  const refOffset = offsets?.[plan.names[keep[ref]]];
  const sunCentre = refOffset ? { x: referenceMoon.x - refOffset.dx, y: referenceMoon.y - refOffset.dy } : undefined;
  const filterCentre = sunCentre ?? { x: referenceMoon.x, y: referenceMoon.y };
  // Along the edge, master pixels within the largest frame displacement (plus the bicubic reach
  // of 2 px) miss some frames.
  let reachPx = 0;
  for (const r of plan.registration) {
    for (const [x, y] of [[0, 0], [width - 1, 0], [0, height - 1], [width - 1, height - 1]]) {
      const p = applyAffine(r.masterToFrame, x, y);
      reachPx = Math.max(reachPx, Math.hypot(p.x - x, p.y - y));
    }
  }
  const edgeBandPx = Math.min(Math.ceil(reachPx) + 2, Math.floor(Math.min(width, height) / 4));
  const { structure, natural, dynamicRangeStops, whiteFractionAtLimb } = renderMasterRenditions({
    master, holes, coverage: merged.coverage, moon: referenceMoon, filterCentre, edgeBandPx, params, runner, onProgress: progress,
  });
  timingsMs.renditions = performance.now() - clock;

  return {
    master,
    coverage: merged.coverage,
    poorlyExposedCount: merged.poorlyExposedCount,
    natural: natural.image,
    structure,
    frames: keep.map((k, i) => {
      const r = plan.registration[i];
      const levels = plan.levels;
      const source = plan.offsets[k].blackLevelSource ?? (isEncoded ? undefined : "none");
      const undetermined = levels?.undetermined.includes(k) ?? false;
      const tau = plan.transmissions[i];
      return {
        name: plan.names[k], width, height, exposureS: plan.exposuresS[i], limb: plan.limbs[i],
        transform: fromAffine(r.masterToFrame, width, height),
        registrationPeak: r.peak,
        registeredAgainst: r.neighbour >= 0 ? plan.names[r.neighbour] : null,
        registrationMethod: r.method === "failed" ? "limb" : r.method,
        registrationNote: r.method === "limb" ? `placed by its limb fit alone: ${r.reason}` : undefined,
        offset: isEncoded ? undefined : {
          dn: plan.offsets[k].blackLevel,
          source: source!,
          sigmaDn: source === "solved" && levels ? levels.offsetSigmas[k] : undefined,
          note: undetermined && source === "none" ? "its offset could not be determined: no other frame sees enough of the same sky well; taken as zero" : undefined,
        },
        transmission: tau,
        effectiveExposureS: plan.effectiveExposuresS[i],
        transmissionNote: describeTransmission(tau),
        weights: merged.frameStats[i],
      };
    }),
    leftOut: plan.leftOut,
    overall: {
      referenceFrame: plan.names[keep[ref]],
      moonCentre: { x: referenceMoon.x, y: referenceMoon.y },
      moonRadiusPx: referenceMoon.radiusPx,
      moonSource: plan.moonSources[ref],
      sunCentre,
      filterCentre,
      dynamicRangeStops,
      natural: { blackPoint: natural.blackPoint, whitePoint: natural.whitePoint, beta: natural.beta, whiteFractionAtLimb },
      timingsMs,
      pipelineVersion: PIPELINE_VERSION,
      parameters: params,
    },
  };
}
