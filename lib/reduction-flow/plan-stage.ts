// The flow's plan, from frames on local disk: sky geometry, registration,
// offsets, transmissions, frames left out (planBracket). Runs in a worker thread
// (plan-thread.ts), so that the worker's main thread keeps renewing the parent
// job's lock however long the plan of a large bracket takes. The registration's
// pairs are compared in two more threads (a frame pool of the plan's own), so
// that both cores of the parent's machine work through it, with the same plan.
import { createPreparePool, PREPARE_WORKERS, startTypeScriptWorker } from "@/lib/reduction-runner/prepare-pool";
import { planBracketOnThreads, type BracketPlan } from "@/lib/imaging/bracket-plan";
import { ImagingError } from "@/lib/imaging/errors";
import { prepareFrameWithLimb, type PreparedFrame } from "@/lib/imaging/frame-stage";
import type { LimbFit } from "@/lib/imaging/limb-fit";
import { createSrgbDecodeTable } from "@/lib/imaging/srgb";
import type { FrameCount, LinearFrame, ReductionParams } from "@/lib/imaging/types";
import { MediaError } from "@/lib/media/errors";
import { ReductionInputError } from "@/lib/reduction-runner/errors";
import { choosePreparedFrames, createFrameSpill, createRemadeFrames, remakePreparedOnRead, spillPrepared, type PreparedFramesChoice, type RemadeFrames } from "@/lib/reduction-runner/frame-spill";
import { resolveSkyGeometry, type RunnerRegistrationMode, type SkyOptions } from "@/lib/reduction-runner/sky-run";
import type { FrameSky } from "@/lib/reduction-runner/sun-geometry";
import type { SunRegistration } from "@/lib/reduction-runner/sun-registration";
import { describeReductionFailure } from "@/lib/reductions/failure-text";
import { createArrayCache, readWorkFile } from "./work-blob";

/** Bytes of frame arrays kept in memory while planning (the rest is read from disk when touched). */
const PLAN_CACHE_BYTES = 512 * 1024 ** 2;

export interface PlanInput {
  /** Work files of the decoded frames, in the survey's order. */
  frameFiles: string[];
  limbs: LimbFit[];
  defects?: Uint8Array;
  params: ReductionParams;
  registration: RunnerRegistrationMode;
  sky?: SkyOptions;
  /** Folder for the prepared frames' pixels while planning. */
  scratchDir: string;
  /** Where the prepared arrays live while planning (frame-spill.ts choosePreparedFrames); default "auto". */
  preparedFrames?: PreparedFramesChoice;
}

/** The sky geometry the plan found, kept for the finish. */
export interface SkyPiece {
  pipelineParams: ReductionParams;
  registrationMode: RunnerRegistrationMode;
  notes: string[];
  skies?: FrameSky[];
  sun?: SunRegistration;
}

export type PlanProgress = (stage: string, fraction: number, frames?: FrameCount) => void;

export async function planFromFiles(input: PlanInput, progress: PlanProgress): Promise<{ plan: BracketPlan; sky: SkyPiece }> {
  const cache = createArrayCache(PLAN_CACHE_BYTES);
  const spill = createFrameSpill({ parentDir: input.scratchDir });
  const pool = createPreparePool();
  try {
    const frames: LinearFrame[] = [];
    const prepared: PreparedFrame[] = [];
    let remade: RemadeFrames | undefined;
    input.frameFiles.forEach((file, j) => {
      const read = readWorkFile<LinearFrame>(file, cache);
      const frame = input.defects ? { ...read, badPixels: input.defects } : read;
      frames.push(frame);
      if (j === 0) {
        // The survey gave every frame one size and encoding; three colour planes at most.
        const size = { width: frame.image.width, height: frame.image.height, encoding: frame.encoding, planeCount: 3 };
        const choice = choosePreparedFrames(input.preparedFrames ?? "auto", input.frameFiles.map(() => size), input.scratchDir);
        if (choice === "made-again") remade = createRemadeFrames();
      }
      // The limb fitted by the part; the linearization made again here, kept on local disk or made again when read.
      const table = frame.encoding === "srgb8" ? createSrgbDecodeTable() : undefined;
      const ready = prepareFrameWithLimb(frame, input.params, input.limbs[j], table);
      prepared.push(remade ? remakePreparedOnRead(ready, () => prepareFrameWithLimb(frame, input.params, input.limbs[j], table), remade) : spillPrepared(spill, ready));
      progress("register", 0, { done: j + 1, total: input.frameFiles.length });
    });
    const sky = resolveSkyGeometry(frames, input.params, input.registration, input.sky, prepared);
    // Every frame comes prepared: planBracket's limb count would only pass them through, and the
    // page would show the limb stage again after the parts' (it reads the plan's own stages).
    const planProgress: PlanProgress = (stage, fraction, frames) => {
      if (stage !== "linearize" && stage !== "limb") progress(stage, fraction, frames);
    };
    const { plan } = await planBracketOnThreads(frames, prepared, sky.pipelineParams, { onProgress: planProgress, keepPrepared: (p) => spillPrepared(spill, p) }, (task) => pool.registerPair(task), PREPARE_WORKERS);
    return { plan, sky: { pipelineParams: sky.pipelineParams, registrationMode: sky.registrationMode, notes: sky.notes, skies: sky.skies, sun: sky.sun } };
  } finally {
    await pool.close();
    spill.close();
  }
}

/** What the plan thread posts: progress, then its answer. */
export type PlanMessage =
  | { kind: "progress"; stage: string; fraction: number; frames?: FrameCount }
  | { kind: "done"; plan: BracketPlan; sky: SkyPiece }
  | { kind: "failed"; inputFault: boolean; message: string };

/** A fault of the input keeps its words for people; anything else its message. */
export function describePlanFault(err: unknown): PlanMessage {
  const inputFault = err instanceof ReductionInputError || err instanceof ImagingError || err instanceof MediaError;
  return { kind: "failed", inputFault, message: inputFault ? describeReductionFailure(err) : err instanceof Error ? err.message : String(err) };
}

/** Thrown for a plan that failed on its input: the caller ends the reduction with these words. */
export class PlanInputFault extends Error {}

/** Runs planFromFiles in a worker thread of its own; progress comes back as it goes. */
export function planInThread(input: PlanInput, progress: PlanProgress): Promise<{ plan: BracketPlan; sky: SkyPiece }> {
  return new Promise((resolve, reject) => {
    const worker = startTypeScriptWorker(new URL("./plan-thread.ts", import.meta.url));
    let settled = false;
    const settle = (fn: () => void) => {
      if (settled) return;
      settled = true;
      fn();
      void worker.terminate();
    };
    worker.on("message", (message: PlanMessage) => {
      if (message.kind === "progress") progress(message.stage, message.fraction, message.frames);
      else if (message.kind === "done") settle(() => resolve({ plan: message.plan, sky: message.sky }));
      else settle(() => reject(message.inputFault ? new PlanInputFault(message.message) : new Error(message.message)));
    });
    worker.on("error", (err) => settle(() => reject(err)));
    worker.on("exit", (code) => settle(() => reject(new Error(`the plan's thread stopped (exit code ${code}) before it answered`))));
    worker.postMessage(input);
  });
}
