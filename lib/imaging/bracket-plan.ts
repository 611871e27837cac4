// The whole-bracket stage of a reduction, between preparing each frame and
// merging: register every frame, solve offsets and transmissions from the
// bracket, leave out what cannot be placed, follow the Moon, and (8-bit) recover
// the camera response. Its result, a BracketPlan, is plain data: what the merge
// of any slice of frames and the finish need, and nothing of the pixels.
import { ImagingError, requireNumberInRange } from "./errors";
import { prepareFrame, type PreparedFrame } from "./frame-stage";
import type { LimbFit } from "./limb-fit";
import { checkFrameShape, linearizeFrame } from "./linearize";
import { estimateMoonTrack } from "./moon-track";
import { measureBracketLevels, type FrameLevels, type LevelSource } from "./frame-levels";
import type { LunarDisk } from "./radial";
import { registerFramesInSteps, runRegistrationSteps, runRegistrationStepsOn, type FrameRegistration, type RegistrationFrame, type RegistrationPairRunner, type RegistrationSteps } from "./register";
import { warpPlanes } from "./resample";
import { convertResponseToTable, recoverResponseCurve, selectResponseSamples } from "./response";
import { composeAffine, type AffineSimilarity } from "./similarity";
import { createSrgbDecodeTable } from "./srgb";
import { DEFAULT_REDUCTION_PARAMS, FILTER_STRENGTH_RANGE, type BlackLevelSource, type FrameCount, type LinearFrame, type ReductionParams } from "./types";

/** Stands in for a plane the reduction no longer needs. */
export const RELEASED_PLANE = new Float32Array(0);

/** A frame the reduction could not use, and why. */
export interface FrameLeftOut {
  name: string;
  reason: string;
}

export interface BracketPlan {
  width: number;
  height: number;
  channels: number;
  isEncoded: boolean;
  params: ReductionParams;
  /** Every input frame's name, in input order. */
  names: string[];
  /** Per input frame: the offset the merge subtracts and where it came from (a solved one replaces the file's). */
  offsets: { blackLevel: number; blackLevelSource?: BlackLevelSource }[];
  levels?: FrameLevels;
  /** Input indices of the frames that go into the merge, in input order. */
  keep: number[];
  leftOut: FrameLeftOut[];
  /** Position in keep of the reference frame. */
  ref: number;
  /** Per kept frame: registration, the Moon, limb fit, exposure and the light it recorded. */
  registration: FrameRegistration[];
  moons: LunarDisk[];
  moonSources: ("own-fit" | "path" | "own-doubtful-fit")[];
  limbs: LimbFit[];
  exposuresS: number[];
  transmissions: number[];
  effectiveExposuresS: number[];
  referenceMoon: LunarDisk;
  /** 8-bit frames: the response the merge's linearization used (sRGB's, or the one recovered from the bracket). */
  responseTable?: Float64Array;
  timingsMs: Record<string, number>;
}

/**
 * A frame's light is corrected (its exposure scaled in the merge) when it differs
 * from what its exposure implies by more than this share and by more than four
 * times its own uncertainty. A thin cloud dims a frame by tens of per cent; the
 * measurement itself can be off by a few per cent where two frames overlap only
 * in a narrow band (measured: up to 5 % on noiseless brackets whose long frames
 * clip most of the field), so smaller differences, such as shutters a few per
 * cent off their marked times, are left as they are.
 */
export const TRANSMISSION_TOLERANCE = 0.1;
/** Below this transmission a frame is named as dimmed (a passing cloud, most often). */
const DIMMED_BELOW = 0.9;

/** Words for a frame's measured transmission, or undefined when it was taken as it is. */
export function describeTransmission(tau: number): string | undefined {
  if (tau === 1) return undefined;
  const pct = Math.round(100 * tau);
  if (tau < DIMMED_BELOW) return `dimmed to ${pct} % of the light the other frames saw (a passing cloud, most likely): its exposure counts as ${pct} % and its weight is lowered to match`;
  return `recorded ${pct} % of the light its stated exposure implies (the shutter's real time differs): its exposure is corrected`;
}

/** Offsets and transmissions of linear frames, measured on the registered bracket (frame-levels.ts). */
function measureFrameLevels(frames: LinearFrame[], ready: PreparedFrame[], registration: FrameRegistration[], referenceLimb: LimbFit, width: number, height: number): FrameLevels {
  // Frames the registration could not place are left out of the measurement (they are left out of the merge too).
  // Pixel data is read when the measurement reaches the frame (the prepared frames may keep it on disk), never all at once.
  const sources: (LevelSource | undefined)[] = ready.map((p, i) => (registration[i].method === "failed" ? undefined : {
    width, height, masterToFrame: registration[i].masterToFrame, noiseSigma: p.linear.noiseSigma,
    get luminance() { return p.luminance; },
    get excluded() { return p.linear.clipped; },
    get masked() { return p.linear.masked; },
  }));
  // Keep well clear of the Moon, which moves between frames, and of its limb light.
  const moon = { x: referenceLimb.x, y: referenceLimb.y, radiusPx: 1.06 * referenceLimb.radiusPx + 4 };
  const levelFrames = frames.map((f) => ({ exposureS: f.exposureS, isOffsetKnown: f.blackLevelSource === "calibrated" || f.blackLevelSource === "file" }));
  return measureBracketLevels(sources, levelFrames, width, height, moon);
}

/**
 * Refuses a bracket that cannot be reduced, naming the frame at fault. Returns
 * the number of colour planes. Each frame's planes are looked at once (a frame
 * kept on disk reads them back at every look).
 */
export function validateBracket(frames: LinearFrame[]): number {
  if (!Array.isArray(frames) || frames.length < 2) {
    throw new ImagingError("too-few-frames", `a bracket needs at least 2 frames, got ${Array.isArray(frames) ? frames.length : 0}`);
  }
  const first = frames[0];
  let channels = 0;
  for (const f of frames) {
    // The shape alone: a frame's planes may wait on disk, and reading every frame here cost a whole pass over the bracket.
    const count = checkFrameShape(f);
    if (f === first) channels = count;
    if (f.image.width !== first.image.width || f.image.height !== first.image.height) {
      throw new ImagingError("size-mismatch", `is ${f.image.width} x ${f.image.height} but ${first.name} is ${first.image.width} x ${first.image.height}`, f.name);
    }
    if (count !== channels) {
      throw new ImagingError("size-mismatch", `has ${count} colour planes but ${first.name} has ${channels}`, f.name);
    }
    if (f.encoding !== first.encoding) throw new ImagingError("bad-parameter", `is ${f.encoding} but ${first.name} is ${first.encoding}; a bracket must be all one kind`, f.name);
  }
  return channels;
}

/**
 * Camera response of an 8-bit bracket (Debevec and Malik 1997) from the green
 * (or only) plane, as a 256-entry linear table. Debevec and Malik assume
 * registered frames: pass the master-to-frame maps (and the Moon, whose edge
 * moves between frames and is kept out of the samples) once registration has run.
 */
export function recoverBracketResponse(frames: LinearFrame[], masterToFrame?: AffineSimilarity[], moon?: LunarDisk): Float64Array {
  const plane = frames[0].image.planes.length === 3 ? 1 : 0;
  const { width, height } = frames[0].image;
  const order = frames.map((_, i) => i).sort((a, b) => frames[a].exposureS - frames[b].exposureS);
  const codes = frames.map((f, i) => {
    const m = masterToFrame?.[i];
    if (!m || (m.a === 1 && m.b === 0 && m.tx === 0 && m.ty === 0)) return f.image.planes[plane];
    const warped = warpPlanes([f.image.planes[plane]], width, height, m, { width, height }, "bilinear").planes[0];
    for (let k = 0; k < warped.length; k++) warped[k] = Math.round(warped[k]);
    return warped;
  });
  const middle = order[Math.floor(order.length / 2)];
  let reference = codes[middle];
  if (moon) {
    // Code 0 is never sampled: blank out the Moon and a band around its moving edge.
    reference = Float32Array.from(reference);
    const r = moon.radiusPx + 12;
    for (let y = Math.max(0, Math.floor(moon.y - r)); y <= Math.min(height - 1, Math.ceil(moon.y + r)); y++) {
      for (let x = Math.max(0, Math.floor(moon.x - r)); x <= Math.min(width - 1, Math.ceil(moon.x + r)); x++) {
        if ((x - moon.x) ** 2 + (y - moon.y) ** 2 < r * r) reference[y * width + x] = 0;
      }
    }
  }
  const samples = selectResponseSamples(reference, width, height, 70);
  const g = recoverResponseCurve(codes, frames.map((f) => f.exposureS), samples, 10);
  return convertResponseToTable(g);
}

/** Refuses parameters the reduction cannot run with, naming the one at fault. */
export function validateParams(params: ReductionParams): void {
  if (!(params.clipFraction > 0 && params.clipFraction <= 1)) throw new ImagingError("bad-parameter", `clipFraction must be in (0, 1], got ${params.clipFraction}`);
  if (params.filter !== "mgn" && params.filter !== "nrgf") throw new ImagingError("bad-parameter", `filter must be "mgn" or "nrgf", got ${String(params.filter)}`);
  if (params.registration !== "moon" && params.registration !== "corona") throw new ImagingError("bad-parameter", `registration must be "moon" or "corona", got ${String(params.registration)}`);
  requireNumberInRange("filterStrength", params.filterStrength ?? DEFAULT_REDUCTION_PARAMS.filterStrength!, FILTER_STRENGTH_RANGE.min, FILTER_STRENGTH_RANGE.max);
}

export interface PlanOptions {
  onProgress?: (stage: string, fraction: number, frames?: FrameCount) => void;
  /** Called on every frame prepared (or prepared again) here; may keep its pixels elsewhere (see ReduceOptions). */
  keepPrepared?: (prepared: PreparedFrame) => PreparedFrame;
}

/**
 * Plans the merge of a bracket. `prepared[i]`, when present, must be
 * prepareFrame(frames[i], params) (with the sRGB decode table for 8-bit frames);
 * missing ones are prepared here. Returns the plan and the prepared frames as
 * the merge must use them (offsets solved here change them), one per kept frame.
 * Each prepared frame's luminance is released at the end: only the merge's
 * inputs remain. Throws ImagingError when fewer than two frames can be placed.
 */
export function planBracket(frames: LinearFrame[], prepared: readonly (PreparedFrame | undefined)[], params: ReductionParams, options: PlanOptions = {}): { plan: BracketPlan; ready: PreparedFrame[] } {
  return runRegistrationSteps(planBracketInSteps(frames, prepared, params, options));
}

/**
 * planBracket with the registration's pair comparisons run through `runPair` (a
 * pool's worker threads), `lanes` at a time; the rest runs here. The same plan.
 */
export function planBracketOnThreads(frames: LinearFrame[], prepared: readonly (PreparedFrame | undefined)[], params: ReductionParams, options: PlanOptions, runPair: RegistrationPairRunner, lanes: number): Promise<{ plan: BracketPlan; ready: PreparedFrame[] }> {
  return runRegistrationStepsOn(planBracketInSteps(frames, prepared, params, options), runPair, lanes);
}

/** planBracket as steps that hand out the registration's pair comparisons (see RegistrationSteps). */
export function* planBracketInSteps(frames: LinearFrame[], prepared: readonly (PreparedFrame | undefined)[], params: ReductionParams, options: PlanOptions = {}): RegistrationSteps<{ plan: BracketPlan; ready: PreparedFrame[] }> {
  const timingsMs: Record<string, number> = {};
  let clock = performance.now();
  const lap = (stage: string) => {
    const now = performance.now();
    timingsMs[stage] = (timingsMs[stage] ?? 0) + (now - clock);
    clock = now;
  };
  const progress = (stage: string, fraction: number, count?: FrameCount) => options.onProgress?.(stage, fraction, count);
  const keepFrame = options.keepPrepared ?? ((p: PreparedFrame) => p);
  const channels = validateBracket(frames);
  validateParams(params);
  const { width, height } = frames[0].image;
  const isEncoded = frames[0].encoding === "srgb8";

  progress("linearize", 0);
  // 8-bit frames are linearized with the sRGB curve for limb fits and registration; a
  // recovered response, when asked for, replaces it for the merge (see below).
  let responseTable = isEncoded ? createSrgbDecodeTable() : undefined;
  const work: LinearFrame[] = frames.slice();
  const ready: PreparedFrame[] = [];
  work.forEach((f, i) => {
    ready.push(prepared[i] ?? keepFrame(prepareFrame(f, params, responseTable)));
    progress("limb", (i + 1) / frames.length, { done: i + 1, total: frames.length });
  });
  lap("linearize-and-limb");
  progress("register", 0);
  const offsets = params.moonMinusSunPx;
  const toRegistration = (p: PreparedFrame): RegistrationFrame => ({
    name: p.linear.name, width, height, exposureS: p.linear.exposureS,
    get luminance() { return p.luminance; },
    get clipped() { return p.linear.clipped; },
    noiseSigma: p.linear.noiseSigma, moonMinusSunPx: offsets?.[p.linear.name],
    limb: p.limb.verdict === "failed" ? { x: NaN, y: NaN, radiusPx: NaN } : { x: p.limb.x, y: p.limb.y, radiusPx: p.limb.radiusPx },
  });
  // Always register on the corona; "moon" mode then moves each frame so that its
  // Moon (or, with offsets, its ephemeris Sun) lands on the reference's, using
  // the Moon path rather than limb fits that clipping has biased.
  let registration = yield* registerFramesInSteps(ready.map(toRegistration), { mode: "corona" });
  lap("register");

  // Offsets and transmissions from the bracket itself (frame-levels.ts); an offset
  // found in the data changes the frame's counts, masks and log images, so the
  // frames are registered again on the corrected light.
  let levels: FrameLevels | undefined;
  const transmissionUsed = work.map(() => 1);
  if (!isEncoded) {
    progress("levels", 0);
    levels = measureFrameLevels(work, ready, registration.frames, ready[registration.referenceIndex].limb, width, height);
    let moved = false;
    let changed = false;
    work.forEach((f, i) => {
      const source = f.blackLevelSource ?? "none";
      if ((source === "none" || source === "solved") && !levels!.undetermined.includes(i)) {
        const o = levels!.offsets[i];
        // A DN count cannot sit below zero: a solved residual a hair under it is noise about a data set already at zero.
        const blackLevel = Math.max(0, f.blackLevel + o);
        work[i] = { ...f, blackLevel, blackLevelSource: "solved" };
        // A residual clamped back to the black level already used changes nothing: the frame stays as prepared.
        if (blackLevel !== f.blackLevel) {
          changed = true;
          const linear = linearizeFrame(work[i], params.clipFraction, { keepPlanes: false });
          ready[i] = keepFrame({ linear, luminance: linear.luminance, limb: ready[i].limb });
        }
        if (Math.abs(o) > 3 * Math.max(ready[i].linear.noiseSigma, 1e-9)) moved = true;
      }
      const tau = levels!.transmissions[i];
      const sigma = levels!.transmissionSigmas[i];
      if (Number.isFinite(tau) && Math.abs(tau - 1) > Math.max(TRANSMISSION_TOLERANCE, 4 * (Number.isFinite(sigma) ? sigma : Infinity))) transmissionUsed[i] = tau;
    });
    lap("levels");
    // Registered again only when some frame's counts changed (the same frames register the same way).
    if (moved && changed) {
      registration = yield* registerFramesInSteps(ready.map(toRegistration), { mode: "corona" });
      lap("register");
    }
  }

  // Frames that neither the corona nor their limb could place are left out, named; the rest go on.
  const leftOut: FrameLeftOut[] = [];
  const keep: number[] = [];
  registration.frames.forEach((r, i) => {
    if (r.method === "failed") leftOut.push({ name: frames[i].name, reason: r.reason ?? "it could not be registered" });
    else keep.push(i);
  });
  if (keep.length < 2) {
    throw new ImagingError("too-few-frames", `only ${keep.length} frame could be placed on the Sun: ${leftOut.map((l) => `${l.name}: ${l.reason}`).join("; ")}`);
  }
  const pickKept = <T,>(list: T[]) => keep.map((i) => list[i]);
  const usedFrames = pickKept(work);
  const usedReady = pickKept(ready);
  const usedRegistration: FrameRegistration[] = pickKept(registration.frames);
  const usedTransmission = pickKept(transmissionUsed);
  const ref = keep.indexOf(registration.referenceIndex);

  let track = estimateMoonTrack(usedReady.map((p, i) => ({
    limb: p.limb, masterToFrame: usedRegistration[i].masterToFrame, captureTimeMs: usedFrames[i].captureTimeMs, exposureS: p.linear.exposureS,
  })));
  if (params.registration === "moon") {
    const anchor = (i: number) => {
      const off = offsets?.[usedFrames[i].name] ?? { dx: 0, dy: 0 };
      return { x: track.disks[i].x - off.dx, y: track.disks[i].y - off.dy };
    };
    const refAnchor = anchor(ref);
    usedRegistration.forEach((r, i) => {
      const a = anchor(i);
      r.masterToFrame = composeAffine(r.masterToFrame, { a: 1, b: 0, tx: a.x - refAnchor.x, ty: a.y - refAnchor.y });
    });
    // Every anchor now sits on the reference's, so each frame's Moon is the reference anchor plus its own offset.
    track = {
      disks: usedFrames.map((f, i) => {
        const off = offsets?.[f.name] ?? { dx: 0, dy: 0 };
        return { x: refAnchor.x + off.dx, y: refAnchor.y + off.dy, radiusPx: track.disks[i].radiusPx };
      }),
      sources: track.sources,
    };
  }
  lap("register");
  // Luminance served the limb fits, levels and registration only: letting each frame's copy
  // go here keeps a bracket's worth of it from sitting beside the merge buffers.
  for (const p of ready) {
    p.luminance = RELEASED_PLANE;
    p.linear.luminance = RELEASED_PLANE;
  }

  const referenceMoon: LunarDisk = track.disks[ref];
  if (isEncoded && params.recoverResponse) {
    progress("response", 0);
    responseTable = recoverBracketResponse(usedFrames, usedRegistration.map((r) => r.masterToFrame), referenceMoon);
    usedReady.forEach((p, i) => {
      const linear = linearizeFrame(usedFrames[i], params.clipFraction, { responseTable });
      usedReady[i] = keepFrame({ linear, luminance: RELEASED_PLANE, limb: p.limb });
    });
    lap("response");
  }
  return {
    plan: {
      width, height, channels, isEncoded, params,
      names: frames.map((f) => f.name),
      offsets: work.map((f) => ({ blackLevel: f.blackLevel, blackLevelSource: f.blackLevelSource })),
      levels, keep, leftOut, ref,
      registration: usedRegistration,
      moons: track.disks,
      moonSources: track.sources,
      limbs: usedReady.map((p) => p.limb),
      exposuresS: usedReady.map((p) => p.linear.exposureS),
      transmissions: usedTransmission,
      effectiveExposuresS: usedReady.map((p, i) => p.linear.exposureS * usedTransmission[i]),
      referenceMoon,
      responseTable: isEncoded ? responseTable : undefined,
      timingsMs,
    },
    ready: usedReady,
  };
}
