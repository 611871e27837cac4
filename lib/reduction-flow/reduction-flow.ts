// One reduction as a stepped flow (lib/queue/stepped-flow.ts): the work of each
// frame (decode, calibrate, limb fit) and the merge of slices of frames are part
// jobs that any worker on any machine takes; the parent does what needs the
// whole bracket (the survey of sensor defects, the plan: registration, offsets,
// transmissions, the Moon's track), combines the partial merges and writes the
// outputs. Payloads are ids; pieces go through S3 (work-store.ts). The numeric
// core is the single-process run's (lib/imaging), called stage by stage, so the
// master is the same within float rounding of the partial merges' sums.
//
// Steps, in order:
//   inputs       parent  the frames and settings, fixed for the run
//   calibration  parent  bias, dark and flat masters (when the set has them)
//   decode       parts   one per light: decode, calibrate; a file that cannot be decoded is left out
//   survey       parent  one size and encoding, at least two frames; defects from the bracket itself
//   limbs        parts   one per decoded frame: linearize and fit the limb
//   plan         parent  sky geometry, registration, offsets, transmissions, frames left out
//   merge-pilot  parts   slices of kept frames, first pass (linear frames only)
//   pilot        parent  the first pass combined
//   merge        parts   slices of kept frames, last pass
//   finish       parent  combine, render, write, store, record
import { getEnv } from "@/lib/env";
import { reductionFilesBase } from "@/lib/reductions/files/manifest";
import { mkdtemp, rm } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { UnrecoverableError } from "bullmq";
import { eq } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db/client";
import { bracketSets, kits, reductions, sites } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { createKeptFrameAdder, createMergePass, finishBracket, prepareKeptFrame } from "@/lib/imaging/bracket-finish";
import { inRunnerMemory, lendRunnerMemory, type PlaneRunner } from "@/lib/imaging/plane-runner";
import type { BracketPlan, FrameLeftOut } from "@/lib/imaging/bracket-plan";
import { buildCalibrationMasters, calibrateLightFrame, type CalibrationMasters } from "@/lib/imaging/calibrate";
import { combineBracketOutliers, findFrameOutliers } from "@/lib/imaging/calibrate-defects";
import { ImagingError } from "@/lib/imaging/errors";
import { prepareFrame } from "@/lib/imaging/frame-stage";
import type { LimbFit } from "@/lib/imaging/limb-fit";
import { combineMergeAccumulators, toPilot, type MergeAccumulator, type PhotonPilot } from "@/lib/imaging/merge";
import { createCodeLookup } from "@/lib/imaging/response";
import { createSrgbDecodeTable } from "@/lib/imaging/srgb";
import { DEFAULT_REDUCTION_PARAMS, type FrameCount, type LinearFrame, type ReductionParams } from "@/lib/imaging/types";
import { applyClockOffset, decodeFrame } from "@/lib/media";
import { MediaError } from "@/lib/media/errors";
import { JOBS } from "@/lib/queue/jobs";
import { defineSteppedFlow, parsePartJobId, type FlowJobContext, type FlowValue, type PartFields } from "@/lib/queue/stepped-flow";
import type { CalibrationReport } from "@/lib/reduction-runner/calibration";
import { checkSameEncoding, checkSameShape, describeDecodedFrame, describeMissingExposure, type FrameProvenance } from "@/lib/reduction-runner/decode-frames";
import { ReductionInputError } from "@/lib/reduction-runner/errors";
import { commitStagedOutput, createStagedOutput } from "@/lib/reduction-runner/output-dir";
import { createPlanePool } from "@/lib/reduction-runner/plane-pool";
import { checkOutputOptions, writeReductionOutputs } from "@/lib/reduction-runner/run-reduction";
import { checkSkyOptions, computeHelioGeometry, type RunnerRegistrationMode, type SkyOptions } from "@/lib/reduction-runner/sky-run";
import { findCalibrationFrames, findCalibrationMismatch } from "@/lib/reductions/calibration-frames";
import { describeReductionFailure } from "@/lib/reductions/failure-text";
import { failReduction, markReductionRunning } from "@/lib/reductions/run";
import { selectReductionFrames, type StoredReductionParams } from "@/lib/reductions/reductions";
import { bucketName, downloadObjectToFile, toSafeFileName } from "@/lib/storage";
import { deleteReductionWork, fetchWorkFile, getWork, putWork, type WorkPlace } from "./work-store";
import type { ArrayMemory } from "@/lib/imaging/plane-runner";
import { planInThread, PlanInputFault, type SkyPiece } from "./plan-stage";
import { storeReductionOutputs } from "./store-outputs";

/** What the worker gives the parent (lib/queue/job-context.ts SteeringContext, built by worker/dispatch.ts). */
export interface ReductionParentContext extends FlowJobContext<{ reductionId: string }> {
  db: Db;
}
export interface ReductionPartContext extends FlowJobContext<{ reductionId: string } & PartFields> {
  db: Db;
}

/** Kept frames are merged in at most this many slices (each a part; each writes an accumulator the parent reads). */
export const MAX_MERGE_SLICES = 8;
/** ...of at least this many frames each, so that a small bracket is not cut into pieces that cost more than they share. */
export const MIN_FRAMES_PER_SLICE = 3;

interface LightInput {
  frameId: string;
  key: string;
  name: string;
  exposureS?: number;
  /** Camera-clock time the photographer gave, UTC ms. */
  captureTimeMs?: number;
}

/** Everything fixed for the run when it starts, stored once (work piece "inputs"). */
export interface FlowInputs {
  lights: LightInput[];
  calibration: (LightInput & { kind: "bias" | "dark" | "flat" })[];
  params: ReductionParams;
  registration: RunnerRegistrationMode;
  sky?: SkyOptions;
  outputLongSidePx: number;
  iiifBaseUrl: string;
  exposureOverrideSource: string;
}

/** A decode part's result: the frame's provenance, or why it was left out. */
type DecodedResult = Extract<DecodeResult, { encoding: unknown }>;
type DecodeResult = { provenance: Omit<FrameProvenance, "path">; encoding: LinearFrame["encoding"]; width: number; height: number } | { leftOut: FrameLeftOut };

interface SurveyValue {
  /** Indices into inputs.lights of the decoded frames, in input order. */
  decoded: number[];
  leftOut: FrameLeftOut[];
  hasDefects: boolean;
  calibration: CalibrationReport;
}


const PEOPLE_STAGES: Record<string, string> = {
  decode: "decoding a frame",
  limbs: "fitting a frame's lunar limb",
  "merge-pilot": "merging a slice of frames (first pass)",
  merge: "merging a slice of frames",
};

function placeOfParent(ctx: ReductionParentContext): WorkPlace {
  return { reductionId: ctx.payload.reductionId, runKey: String(ctx.job.timestamp) };
}

function placeOfPart(ctx: ReductionPartContext): WorkPlace {
  return { reductionId: ctx.payload.reductionId, runKey: String(parsePartJobId(ctx.jobId).parentTimestamp) };
}

/** Runs `work` in a scratch folder of its own, removed afterwards. */
async function withScratch<T>(label: string, work: (dir: string) => Promise<T>): Promise<T> {
  const dir = await mkdtemp(path.join(os.tmpdir(), `crownlight-${label}-`));
  try {
    return await work(dir);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

/** Faults of the input (a file, a setting, a bracket that cannot be reduced) end the flow at once with words for people. */
async function asInputFault<T>(work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    if (err instanceof ReductionInputError || err instanceof ImagingError || err instanceof MediaError) throw new UnrecoverableError(describeReductionFailure(err));
    if (err instanceof AppError) throw new UnrecoverableError(err.message);
    throw err;
  }
}

async function setStage(db: DbOrTx, reductionId: string, stage: string, fraction: number, frames?: FrameCount): Promise<void> {
  await db.update(reductions).set({ stage, progress: Math.min(1, Math.max(0, fraction)), stageFramesDone: frames?.done ?? null, stageFramesTotal: frames?.total ?? null }).where(eq(reductions.id, reductionId));
}

/** A progress function for a long parent step: writes at most every 2 %, never awaited inside the numeric loops. */
function progressWriter(ctx: ReductionParentContext) {
  let last = -1;
  let lastStage = "";
  return (stage: string, fraction: number, frames?: FrameCount) => {
    if (stage === lastStage && fraction - last < 0.02 && fraction !== 1) return;
    last = fraction;
    lastStage = stage;
    void setStage(ctx.db, ctx.payload.reductionId, stage, fraction, frames).catch(() => undefined);
    void ctx.report(stage, fraction).catch(() => undefined);
  };
}

// Pieces every part of a run reads (inputs, masters, plan, pilot) are kept in the worker process between parts.
const pieceCache = new Map<string, unknown>();
async function cachedPiece<T>(place: WorkPlace, name: string): Promise<T> {
  const key = `${place.reductionId}/${place.runKey}/${name}`;
  if (pieceCache.has(key)) return pieceCache.get(key) as T;
  const value = await getWork<T>(place, name);
  // Only the current run's pieces stay: a worker moves from reduction to reduction.
  for (const k of pieceCache.keys()) if (!k.startsWith(`${place.reductionId}/${place.runKey}/`)) pieceCache.delete(k);
  pieceCache.set(key, value);
  return value;
}

/** A decoded frame, its float32 and uint8 arrays into `memory` when given (see getWork). */
async function loadFrame(place: WorkPlace, light: number, memory?: ArrayMemory): Promise<LinearFrame> {
  return getWork<LinearFrame>(place, `frame-${light}`, memory);
}

/** A decoded frame with the bracket's own defect mask, as calibrateBracket gives it without masters. */
function withDefects(frame: LinearFrame, defects: Uint8Array | undefined): LinearFrame {
  return defects ? { ...frame, badPixels: defects } : frame;
}

/** Consecutive slices of the kept frames' positions, as even as they come. */
export function sliceKept(count: number): { from: number; to: number }[] {
  const slices = Math.max(1, Math.min(MAX_MERGE_SLICES, Math.ceil(count / MIN_FRAMES_PER_SLICE)));
  return Array.from({ length: slices }, (_, s) => ({ from: Math.floor((s * count) / slices), to: Math.floor(((s + 1) * count) / slices) }));
}

/** An accumulator as stored: without its scratch buffers, code lookup and pilot (only adding frames needs those). */
function storableAccumulator(acc: MergeAccumulator): Omit<MergeAccumulator, "codeOf" | "useScratch" | "pilot"> {
  const { codeOf: _c, useScratch: _u, pilot: _p, ...rest } = acc;
  return rest;
}

function reviveAccumulator(plan: BracketPlan, stored: MergeAccumulator): MergeAccumulator {
  return plan.isEncoded ? { ...stored, codeOf: createCodeLookup(plan.responseTable!) } : stored;
}

/** Combines a step's partial merges in slice order, reading one at a time. */
async function combineSlices(place: WorkPlace, plan: BracketPlan, step: string, slices: number): Promise<MergeAccumulator> {
  let acc: MergeAccumulator | undefined;
  for (let s = 0; s < slices; s++) {
    const part = reviveAccumulator(plan, await getWork<MergeAccumulator>(place, `${step}-${s}`));
    acc = acc ? combineMergeAccumulators([acc, part]) : part;
  }
  return acc!;
}

/** The Redis set of kept positions a merge step has merged: a frame merged again by a retried part counts once. */
function mergedFramesKey(ctx: { job: { queueQualifiedName: string } }, place: WorkPlace, step: string): string {
  return `${ctx.job.queueQualifiedName}:merged-frames:${place.reductionId}:${place.runKey}:${step}`;
}

/** Counts a merged frame and shows the count on the reduction ("Frames merged: 41 of 120"). */
async function countMergedFrame(ctx: ReductionPartContext, place: WorkPlace, step: string, position: number, kept: number): Promise<void> {
  const key = mergedFramesKey(ctx, place, step);
  const [, [, done]] = (await ctx.redis.multi().sadd(key, position).scard(key).expire(key, 24 * 3600).exec()) as [unknown, [unknown, number]];
  await setStage(ctx.db, place.reductionId, step, done / kept, { done, total: kept });
}

/** Merges one slice of kept frames into a fresh accumulator and stores it. */
async function mergeSlice(ctx: ReductionPartContext, step: "merge-pilot" | "merge"): Promise<FlowValue> {
  const place = placeOfPart(ctx);
  const plan = await cachedPiece<BracketPlan>(place, "plan");
  const survey = await cachedPiece<{ decoded: number[]; defects?: Uint8Array }>(place, "survey");
  const pilot = step === "merge" && !plan.isEncoded ? await cachedPiece<PhotonPilot>(place, "pilot") : undefined;
  const { from, to } = sliceKept(plan.keep.length)[ctx.payload.part];
  // Each band's rows on both cores (the plane pool's worker and this thread), the same slice bit for bit.
  const planes = createPlanePool();
  try {
    await planes.ready();
    const acc = createMergePass(plan, pilot && sharePilot(pilot, planes), planes);
    const adder = createKeptFrameAdder(plan, planes);
    // Each frame is read straight into the pool's memory (its threads take it without a copy) and given back once added.
    const { memory, giveBack } = lendRunnerMemory(planes);
    for (let position = from; position < to; position++) {
      const frame = withDefects(await loadFrame(place, survey.decoded[plan.keep[position]], memory), survey.defects);
      adder.add(acc, position, frame, prepareKeptFrame(plan, position, frame));
      giveBack();
      await countMergedFrame(ctx, place, step, position, plan.keep.length);
    }
    adder.release();
    await putWork(place, `${step}-${ctx.payload.part}`, storableAccumulator(acc));
  } finally {
    await planes.close();
  }
  return to - from;
}

/** The pilot in a runner's memory, so that its threads read it. */
function sharePilot(pilot: PhotonPilot, runner: PlaneRunner): PhotonPilot {
  const copy = (a: Float32Array) => inRunnerMemory(runner, a).array;
  return { sums: pilot.sums.map(copy), weights: copy(pilot.weights) };
}

/** The run's inputs from the database: the frames the start form checked, the set's calibration frames, settings. */
export async function gatherInputs(db: DbOrTx, reductionId: string): Promise<FlowInputs> {
  const [red] = await db.select().from(reductions).where(eq(reductions.id, reductionId)).limit(1);
  if (!red) throw new UnrecoverableError(`reduction ${reductionId} does not exist`);
  const [set] = await db.select().from(bracketSets).where(eq(bracketSets.id, red.bracketSetId)).limit(1);
  if (!set) throw new UnrecoverableError(`the bracket set of reduction ${red.id} is gone`);
  const [site] = await db.select().from(sites).where(eq(sites.id, set.siteId)).limit(1);
  const [kit] = set.kitId ? await db.select().from(kits).where(eq(kits.id, set.kitId)).limit(1) : [];
  const stored: StoredReductionParams = red.params;
  const frameRows = await selectReductionFrames(db, set, stored.groupNumber ?? null);
  const calibrationRows = await findCalibrationFrames(db, set.id);
  const mismatch = findCalibrationMismatch(frameRows, calibrationRows);
  if (mismatch) throw new AppError("invalid_input", mismatch);
  // Names must be unique in a bracket (the report names frames by them); calibration frames share the namespace.
  const seen = new Set<string>();
  const nameOf = (f: { id: string; originalFileName: string }) => {
    let name = toSafeFileName(f.originalFileName);
    if (seen.has(name)) name = `${f.id.slice(0, 8)}-${name}`;
    seen.add(name);
    return name;
  };
  const lights: LightInput[] = frameRows.map((f) => ({
    frameId: f.id, key: f.originalKey, name: nameOf(f),
    exposureS: f.exposureSource === "photographer" && f.exposureS !== null ? f.exposureS : undefined,
    captureTimeMs: f.givenCaptureAt ? f.givenCaptureAt.getTime() : undefined,
  }));
  const calibration = calibrationRows.map((f) => ({
    frameId: f.id, key: f.originalKey, name: nameOf(f), kind: f.kind,
    exposureS: f.exposureSource === "photographer" && f.exposureS !== null ? f.exposureS : undefined,
  }));
  const sky: SkyOptions | undefined = site
    ? {
        site: site.kind === "moving" && site.track ? { kind: "track", points: site.track, source: site.trackFileName ?? site.name } : { kind: "fixed", location: { latDeg: site.latDeg, lonDeg: site.lonDeg, elevationM: site.elevationM } },
        clockOffsetS: set.clockOffsetS,
        camera: kit ? { mount: kit.mount, flipHorizontal: kit.flipHorizontal, flipVertical: kit.flipVertical } : undefined,
        // A north angle the photographer gave wins over the mount's.
        ...(set.northAngleDeg !== null ? { northAngleDeg: set.northAngleDeg } : {}),
      }
    : undefined;
  const params: ReductionParams = { ...DEFAULT_REDUCTION_PARAMS, filter: stored.filter, recoverResponse: stored.recoverResponse, filterStrength: stored.filterStrength };
  const registration: RunnerRegistrationMode = stored.registration ?? params.registration;
  checkSkyOptions(registration, sky);
  checkOutputOptions(params, stored.outputLongSidePx);
  return {
    lights, calibration, params, registration, sky,
    outputLongSidePx: stored.outputLongSidePx ?? 0,
    // IIIF ids name where the app serves this reduction's tiles.
    iiifBaseUrl: `${getEnv().APP_URL.replace(/\/+$/, "")}${reductionFilesBase(red.id)}`,
    exposureOverrideSource: "the photographer's corrections",
  };
}

/** Decodes one calibration file as calibration.ts does for the single-process run. */
async function loadMasters(inputs: FlowInputs, dir: string): Promise<CalibrationMasters> {
  const decodeOne = async (c: FlowInputs["calibration"][number]): Promise<LinearFrame> => {
    const local = path.join(dir, c.name);
    await downloadObjectToFile({ bucket: bucketName("originals"), key: c.key }, local);
    const decoded = await decodeFrame(local, c.name);
    const exposureS = c.exposureS ?? decoded.metadata.exposureS ?? (c.kind === "bias" ? 1e-6 : undefined);
    if (exposureS === undefined) throw new ReductionInputError("missing-exposure", `${c.name}: this ${c.kind} frame has no exposure time in the file; give it, since ${c.kind === "dark" ? "darks are matched to lights by exposure" : "a flat's offset depends on it"}`);
    await rm(local, { force: true });
    return { name: c.name, image: decoded.image, exposureS, blackLevel: decoded.blackLevel, whiteLevel: decoded.whiteLevel, blackLevelSource: decoded.blackLevelSource, encoding: decoded.encoding, captureTimeMs: decoded.metadata.captureTimeMs };
  };
  const of = async (kind: "bias" | "dark" | "flat") => {
    const out: LinearFrame[] = [];
    for (const c of inputs.calibration.filter((x) => x.kind === kind)) out.push(await decodeOne(c));
    return out;
  };
  return buildCalibrationMasters({ bias: await of("bias"), darks: await of("dark"), flats: await of("flat") });
}

function countSet(mask: Uint8Array): number {
  let n = 0;
  for (const v of mask) n += v;
  return n;
}

export const reductionFlow = defineSteppedFlow<ReductionParentContext, ReductionPartContext>({
  partJob: "reduction.part",
  partQueue: JOBS["reduction.part"].queue,
  partAttempts: JOBS["reduction.part"].attempts,
  steps: [
    {
      name: "inputs",
      stage: "start",
      run: (ctx) => asInputFault(async () => {
        const inputs = await gatherInputs(ctx.db, ctx.payload.reductionId);
        await putWork(placeOfParent(ctx), "inputs", inputs);
        await markReductionRunning(ctx.db, ctx.payload.reductionId);
        return { lights: inputs.lights.length, calibration: inputs.calibration.length };
      }),
    },
    {
      name: "calibration",
      run: (ctx) => asInputFault(async () => {
        const place = placeOfParent(ctx);
        const inputs = await cachedPiece<FlowInputs>(place, "inputs");
        if (inputs.calibration.length === 0) return { masters: false };
        await setStage(ctx.db, ctx.payload.reductionId, "calibration", 0);
        const masters = await withScratch("calibration", (dir) => loadMasters(inputs, dir));
        await putWork(place, "masters", masters);
        return { masters: true };
      }),
    },
    {
      name: "decode",
      stage: "decode",
      parts: async (ctx) => Array.from({ length: (ctx.values.inputs as { lights: number }).lights }, () => ({ reductionId: ctx.payload.reductionId })),
      part: (ctx) => asInputFault(async () => {
        const place = placeOfPart(ctx);
        const inputs = await cachedPiece<FlowInputs>(place, "inputs");
        const light = inputs.lights[ctx.payload.part];
        return withScratch("decode", async (dir): Promise<FlowValue> => {
          const local = path.join(dir, light.name);
          await downloadObjectToFile({ bucket: bucketName("originals"), key: light.key }, local);
          let decoded;
          try {
            decoded = await decodeFrame(local, light.name);
          } catch (err) {
            // A file that cannot be decoded is left out, named, and the bracket goes on without it.
            if (err instanceof MediaError) return { leftOut: { name: light.name, reason: `it could not be decoded: ${describeReductionFailure(err).replace(/^[^:]*: /, "")}` } } satisfies DecodeResult;
            throw err;
          }
          const { frame, provenance } = describeDecodedFrame(decoded, light.name, light.exposureS, light.captureTimeMs);
          if (Number.isNaN(provenance.exposureS)) throw describeMissingExposure([provenance]);
          // True capture times, as the single-process run has them after applyClockOffsetToBracket.
          const offsetS = inputs.sky?.clockOffsetS ?? 0;
          if (offsetS !== 0) {
            frame.captureTimeMs = applyClockOffset({ captureTimeMs: frame.captureTimeMs }, offsetS).captureTimeMs;
            provenance.captureTimeMs = frame.captureTimeMs;
          }
          const masters = inputs.calibration.length > 0 ? await cachedPiece<CalibrationMasters>(place, "masters") : undefined;
          const ready = masters && frame.encoding === "linear" ? calibrateLightFrame(frame, masters) : frame;
          await putWork(place, `frame-${ctx.payload.part}`, ready);
          // Without calibration frames, the survey finds the defects in the bracket: this frame's marks, counted there.
          if (!masters && frame.encoding === "linear") await putWork(place, `defects-${ctx.payload.part}`, findFrameOutliers(frame));
          const { path: _path, ...rest } = provenance;
          return JSON.parse(JSON.stringify({ provenance: rest, encoding: frame.encoding, width: frame.image.width, height: frame.image.height } satisfies DecodeResult)) as FlowValue;
        });
      }),
      // The results go to S3 whole: the parent's job data keeps only small values.
      run: async (ctx, results) => {
        await putWork(placeOfParent(ctx), "decoded", results);
        return results.length;
      },
    },
    {
      name: "survey",
      stage: "survey",
      run: (ctx) => asInputFault(async () => {
        const place = placeOfParent(ctx);
        const inputs = await cachedPiece<FlowInputs>(place, "inputs");
        const decodeResults = await cachedPiece<DecodeResult[]>(place, "decoded");
        const decoded: number[] = [];
        const leftOut: FrameLeftOut[] = [];
        const provenance: FrameProvenance[] = [];
        decodeResults.forEach((r, i) => {
          if ("leftOut" in r) leftOut.push(r.leftOut);
          else {
            decoded.push(i);
            provenance.push({ ...r.provenance, path: inputs.lights[i].name });
          }
        });
        if (decoded.length < 2) {
          throw new ReductionInputError("too-few-frames", `a bracket needs at least 2 frames, and only ${decoded.length} could be decoded: ${leftOut.map((l) => `${l.name}: ${l.reason}`).join("; ")}`);
        }
        checkSameShape(provenance);
        const frames = await (async () => {
          // The frames stay in storage: the survey reads only what the decode parts reported.
          checkSameEncoding(decoded.map((i) => ({ name: inputs.lights[i].name, encoding: (decodeResults[i] as DecodedResult).encoding })), provenance);
          const first = decodeResults[decoded[0]] as DecodedResult;
          if (first.encoding !== "linear") return { calibration: { source: "none", badPixelCount: 0 } as CalibrationReport };
          if (inputs.calibration.length > 0) {
            const masters = await cachedPiece<CalibrationMasters>(place, "masters");
            return { calibration: { source: "masters", summary: masters.summary, badPixelCount: countSet(masters.badPixels) } as CalibrationReport };
          }
          // Without calibration frames, the defects are found in the bracket itself (calibrateBracket's rule): each frame's marks, counted.
          setStage(ctx.db, ctx.payload.reductionId, "survey", 0).catch(() => undefined);
          const candidates: Uint32Array[] = [];
          for (const i of decoded) candidates.push(await getWork<Uint32Array>(place, `defects-${i}`));
          const badPixels = combineBracketOutliers(candidates, first.width * first.height);
          const count = countSet(badPixels);
          return { calibration: { source: count > 0 ? "bracket" : "none", badPixelCount: count } as CalibrationReport, defects: count > 0 ? badPixels : undefined };
        })();
        await putWork(place, "survey", { decoded, provenance, leftOut, calibration: frames.calibration, defects: frames.defects });
        return JSON.parse(JSON.stringify({ decoded, leftOut, hasDefects: Boolean(frames.defects), calibration: frames.calibration } satisfies SurveyValue)) as FlowValue;
      }),
    },
    {
      name: "limbs",
      stage: "limb",
      parts: async (ctx) => (ctx.values.survey as unknown as SurveyValue).decoded.map(() => ({ reductionId: ctx.payload.reductionId })),
      part: (ctx) => asInputFault(async () => {
        const place = placeOfPart(ctx);
        const inputs = await cachedPiece<FlowInputs>(place, "inputs");
        const survey = await cachedPiece<{ decoded: number[]; defects?: Uint8Array }>(place, "survey");
        const frame = withDefects(await loadFrame(place, survey.decoded[ctx.payload.part]), survey.defects);
        const prepared = prepareFrame(frame, inputs.params, frame.encoding === "srgb8" ? createSrgbDecodeTable() : undefined);
        // Non-finite numbers (a failed fit's centre) travel as text: the part's result is JSON.
        return JSON.parse(JSON.stringify(prepared.limb, (_k, v: unknown) => (typeof v === "number" && !Number.isFinite(v) ? `${v}` : v))) as FlowValue;
      }),
      run: async (ctx, results) => {
        // The fits go to S3 whole, numbers restored (the parts' JSON carried non-finite ones as text).
        const limbs = results.map((r) => Object.fromEntries(Object.entries(r as Record<string, unknown>).map(([k, v]) => [k, v === "NaN" || v === "Infinity" || v === "-Infinity" ? Number(v) : v])));
        await putWork(placeOfParent(ctx), "limbs", limbs);
        return results.length;
      },
    },
    {
      name: "plan",
      stage: "register",
      run: (ctx) => asInputFault(() => withScratch("plan", async (dir) => {
        const place = placeOfParent(ctx);
        const progress = progressWriter(ctx);
        const inputs = await cachedPiece<FlowInputs>(place, "inputs");
        const survey = await cachedPiece<{ decoded: number[]; defects?: Uint8Array }>(place, "survey");
        const limbs = await getWork<LimbFit[]>(place, "limbs");
        const frameFiles: string[] = [];
        for (const i of survey.decoded) frameFiles.push(await fetchWorkFile(place, `frame-${i}`, dir));
        let planned;
        try {
          planned = await planInThread({ frameFiles, limbs, defects: survey.defects, params: inputs.params, registration: inputs.registration, sky: inputs.sky, scratchDir: dir }, progress);
        } catch (err) {
          if (err instanceof PlanInputFault) throw new UnrecoverableError(err.message);
          throw err;
        }
        await putWork(place, "sky", planned.sky);
        await putWork(place, "plan", planned.plan);
        return { kept: planned.plan.keep.length, slices: sliceKept(planned.plan.keep.length).length, encoded: planned.plan.isEncoded };
      })),
    },
    {
      name: "merge-pilot",
      stage: "merge-pilot",
      parts: async (ctx) => {
        const plan = ctx.values.plan as { slices: number; encoded: boolean };
        return plan.encoded ? [] : Array.from({ length: plan.slices }, () => ({ reductionId: ctx.payload.reductionId }));
      },
      part: (ctx) => asInputFault(() => mergeSlice(ctx, "merge-pilot")),
    },
    {
      name: "pilot",
      stage: "merge-pilot",
      run: (ctx) => asInputFault(async () => {
        const values = ctx.values.plan as { slices: number; encoded: boolean };
        if (values.encoded) return null;
        const place = placeOfParent(ctx);
        const plan = await cachedPiece<BracketPlan>(place, "plan");
        const first = await combineSlices(place, plan, "merge-pilot", values.slices);
        await putWork(place, "pilot", toPilot(first));
        return null;
      }),
    },
    {
      name: "merge",
      stage: "merge",
      parts: async (ctx) => Array.from({ length: (ctx.values.plan as { slices: number }).slices }, () => ({ reductionId: ctx.payload.reductionId })),
      part: (ctx) => asInputFault(() => mergeSlice(ctx, "merge")),
    },
    {
      name: "finish",
      stage: "renditions",
      run: (ctx) => asInputFault(() => withScratch("finish", async (dir) => {
        // The report's total runs from when the reduction started, not from this step.
        const [row] = await ctx.db.select({ startedAt: reductions.startedAt }).from(reductions).where(eq(reductions.id, ctx.payload.reductionId)).limit(1);
        const started = performance.now() - (row?.startedAt ? Math.max(0, Date.now() - row.startedAt.getTime()) : 0);
        const place = placeOfParent(ctx);
        const progress = progressWriter(ctx);
        const inputs = await cachedPiece<FlowInputs>(place, "inputs");
        const survey = await cachedPiece<{ decoded: number[]; provenance: FrameProvenance[]; leftOut: FrameLeftOut[]; calibration: CalibrationReport }>(place, "survey");
        const sky = await getWork<SkyPiece>(place, "sky");
        const plan = await cachedPiece<BracketPlan>(place, "plan");
        // The renditions on both cores, the same as on this thread alone (the pool's worker starts while the slices are read).
        const planes = createPlanePool();
        let result;
        try {
          const acc = await combineSlices(place, plan, "merge", sliceKept(plan.keep.length).length);
          result = finishBracket(plan, acc, progress, 0, planes);
        } finally {
          await planes.close();
        }
        // Frames that could not be decoded are left out beside those the plan could not place.
        result.leftOut = [...survey.leftOut, ...result.leftOut];
        const helio = sky.skies && sky.sun ? computeHelioGeometry(sky.skies, sky.sun, result) : undefined;
        const output = await createStagedOutput(path.join(dir, "out"));
        const frameIds = Object.fromEntries(inputs.lights.map((l) => [l.name, l.frameId]));
        const timingsMs: Record<string, number> = { ...result.overall.timingsMs };
        const report = await writeReductionOutputs(output, {
          result, provenance: survey.provenance, helio, registrationMode: sky.registrationMode, calibration: survey.calibration, timingsMs, started,
          exposureOverrideSource: inputs.exposureOverrideSource, outputLongSidePx: inputs.outputLongSidePx, iiifBaseUrl: inputs.iiifBaseUrl, frameIds,
          notes: sky.notes, clockOffsetS: inputs.sky?.clockOffsetS ?? 0, site: inputs.sky?.site, skies: sky.skies, sun: sky.sun,
        }, progress);
        await commitStagedOutput(output);
        await storeReductionOutputs(ctx.db, ctx.payload.reductionId, output.finalDir, report, (fraction) => progress("store", fraction));
        await deleteReductionWork(ctx.payload.reductionId);
        return null;
      })),
    },
  ],
  onProgress: async (ctx, { step, stage, done, total }) => {
    // Merge parts are slices of frames: they count their frames themselves (countMergedFrame).
    if (step === "merge-pilot" || step === "merge") return;
    await setStage(ctx.db, ctx.payload.reductionId, stage, total > 0 ? done / total : 0, { done, total });
  },
  onFailed: async (ctx, error) => {
    // A part's failure reaches the parent as "part i of n of step "x" failed: reason": people read the reason.
    const partFault = /^part (\d+) of (\d+) of step "([^"]+)" failed: ([\s\S]*)$/.exec(error.message);
    const reason = partFault ? partFault[4] : error.message;
    // The parent's own fault on its last attempt was retried; a part's comes wrapped, its retries already spent.
    const retried = !(error instanceof UnrecoverableError);
    const words = partFault && !isPeopleText(reason) ? `a worker failed while ${PEOPLE_STAGES[partFault[3]] ?? "reducing"}: ${reason}` : reason;
    await failReduction(ctx.db, ctx.payload.reductionId, retried ? `${words} (after ${JOBS["reduction.run"].attempts} attempts)` : words);
  },
});

/** True for a reason already in people's words (a fault of the input the runner described). */
function isPeopleText(reason: string): boolean {
  return !/^(Error|TypeError|RangeError|ECONN|ENO|EACCES)\b/.test(reason);
}
