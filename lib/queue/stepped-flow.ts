// A parent job that runs in steps; a step may fan out part jobs that any worker
// process on any machine takes (BullMQ's waiting-children pattern: parts are
// added with the parent option, the parent moves to waiting-children and is
// processed again once they are done).
//
// What makes it safe to kill any process at any moment:
// - The parent's progress (the step it is at, the values earlier steps returned,
//   how many parts the current step queued) lives in its job data, written with
//   job.updateData after each change, so a parent taken again after a crash or a
//   retry resumes at the step it had reached.
// - A part's job id is `${parentId}__${parentCreatedMs}__${step}__${index}`: a step
//   run again cannot add a part twice (BullMQ keeps one job per id), and a parent
//   queued anew under the same id never inherits an older run's parts.
// - A part's result is its return value, which BullMQ stores once, in the
//   parent's processed hash under the part's own job key, only when the part
//   completes while holding its lock. Results are then read by part index, so a
//   part retried after a kill, or run twice, is counted once.
import { UnrecoverableError, WaitingChildrenError, type Job } from "bullmq";
import { z } from "zod";
import type { JobRun, SteeringFields } from "./job-context";
import { STEP_NAME, type PartFields } from "./part-fields";

export type FlowValue = string | number | boolean | null | FlowValue[] | { [key: string]: FlowValue };

export { PART_FIELDS, type PartFields } from "./part-fields";

/** Part jobs: retried with backoff, kept a day after success (never by count: a large flow has thousands of parts). */
const PART_JOB_OPTIONS = {
  backoff: { type: "exponential", delay: 2000 },
  // A part that fails for good wakes the parent, which ends the flow with the part's reason.
  continueParentOnFailure: true,
  removeOnComplete: { age: 24 * 3600 },
  removeOnFail: { age: 7 * 24 * 3600 },
} as const;
/** Parts are added in batches of this many (one MULTI each). */
const ADD_BATCH = 200;

/** What the worker gives every handler that a flow needs (worker/dispatch.ts builds it; lib/queue/job-context.ts). */
export interface FlowJobContext<P> extends JobRun<P>, SteeringFields {}

/** A parent step's context: the parent's own, plus what the earlier steps returned. */
export type StepContext<PC> = PC & { values: Readonly<Record<string, FlowValue>> };

/** The ids of one part, without the flow's own fields (added by the flow). */
export type PartIds<CC extends FlowJobContext<PartFields>> = Omit<CC["payload"], keyof PartFields>;

export interface FlowStep<PC extends FlowJobContext<unknown>, CC extends FlowJobContext<PartFields>> {
  /** Stable name: it is in the ids of the step's parts, so never rename a step while flows are in flight. */
  name: string;
  /** Stage shown while the step runs (default: its name). */
  stage?: string;
  /**
   * The step's parts, in order, as payloads of ids. Called when the step starts, and again only if the
   * parent died before all of them were queued, or a part's job vanished: it must give the same list each
   * time (derive it from what the flow has fixed, never from data that may change meanwhile).
   */
  parts?: (ctx: StepContext<PC>) => Promise<PartIds<CC>[]>;
  /** The work of one part, in whichever worker takes it. Its return value (small JSON) is the part's result. */
  part?: (ctx: CC) => Promise<FlowValue>;
  /**
   * Runs once every part is done, with their results in part order (or at once for a step without
   * parts), and returns a small JSON value that the later steps see in `values[name]`. A parent killed
   * here runs it again: write anything it stores under keys of its own, overwriting.
   */
  run?: (ctx: StepContext<PC>, results: FlowValue[]) => Promise<FlowValue | void>;
}

export interface SteppedFlowDefinition<PC extends FlowJobContext<unknown>, CC extends FlowJobContext<PartFields>> {
  /** Job name of the parts, and the queue they go to. */
  partJob: string;
  partQueue: string;
  partAttempts: number;
  steps: FlowStep<PC, CC>[];
  /** Called with every count of finished parts (in the part's worker, and by the parent when a step starts and ends). */
  onProgress?: (ctx: PC | CC, progress: { step: string; stage: string; done: number; total: number }) => Promise<void>;
  /** Called once when the flow ends for good (a part failed on its last attempt, or the parent's own step did). */
  onFailed?: (ctx: PC, error: Error) => Promise<void>;
}

const FLOW_STATE = z.object({
  step: z.number().int().min(0),
  values: z.record(z.string(), z.json()),
  /** Parts the current step has queued (all of them). */
  queued: z.number().int().min(1).optional(),
});
type FlowState = z.infer<typeof FLOW_STATE>;

/** The key under which the parent's job data keeps the flow's state; the parent's payload must not use it. */
export const FLOW_STATE_KEY = "flow";

function readState(data: unknown): FlowState {
  const raw = (data as Record<string, unknown> | undefined)?.[FLOW_STATE_KEY];
  if (raw === undefined) return { step: 0, values: {} };
  const parsed = FLOW_STATE.safeParse(raw);
  if (!parsed.success) throw new UnrecoverableError(`the flow state kept with job is unreadable: ${parsed.error.issues[0]?.message}`);
  return parsed.data as FlowState;
}

/**
 * One line in the worker's log per part and per parent step, with when it started and ended
 * (ms since the epoch) and this process's pid, so that an operator (and the scale benchmark,
 * parseStepTimes) can see which steps ran one after the other and which were shared.
 */
function logStepTime(parentId: string, step: string, what: string, startMs: number): void {
  const endMs = Date.now();
  console.log(`[flow] ${parentId} ${step} ${what} start=${startMs} end=${endMs} ms=${endMs - startMs} pid=${process.pid}`);
}

/** One line logStepTime wrote. */
export interface StepTime {
  parentId: string;
  step: string;
  /** "run" for the parent's own work, else "part i/n". */
  what: string;
  startMs: number;
  endMs: number;
  pid: number;
}

/** Every step-time line in a worker's log. */
export function parseStepTimes(log: string): StepTime[] {
  const out: StepTime[] = [];
  for (const m of log.matchAll(/^\[flow\] (\S+) (\S+) (run|part \d+\/\d+) start=(\d+) end=(\d+) ms=\d+ pid=(\d+)$/gm)) {
    out.push({ parentId: m[1], step: m[2], what: m[3], startMs: Number(m[4]), endMs: Number(m[5]), pid: Number(m[6]) });
  }
  return out;
}

/** The id prefix of one step's parts of one parent job (the index follows). */
export function partIdPrefix(parent: Pick<Job, "id" | "timestamp">, step: string): string {
  return `${parent.id}__${parent.timestamp}__${step}__`;
}

function escapeGlob(text: string): string {
  return text.replace(/[*?[\]\\]/g, (c) => `\\${c}`);
}

export class SteppedFlow<PC extends FlowJobContext<unknown>, CC extends FlowJobContext<PartFields>> {
  constructor(readonly definition: SteppedFlowDefinition<PC, CC>) {
    const seen = new Set<string>();
    for (const step of definition.steps) {
      if (!STEP_NAME.test(step.name)) throw new Error(`step name "${step.name}" must be lower-case letters, digits and hyphens`);
      if (seen.has(step.name)) throw new Error(`step "${step.name}" appears twice`);
      seen.add(step.name);
      if (Boolean(step.parts) !== Boolean(step.part)) throw new Error(`step "${step.name}" needs both parts and part, or neither`);
    }
    if (!Number.isInteger(definition.partAttempts) || definition.partAttempts < 1) throw new Error("partAttempts must be a whole number, at least 1");
  }

  /** The parent job's handler: runs the steps from where the job's data says it stopped. Returns every step's value. */
  readonly runParent = async (ctx: PC): Promise<Record<string, FlowValue>> => {
    try {
      return await this.runSteps(ctx);
    } catch (err) {
      if (err instanceof WaitingChildrenError) throw err;
      const final = err instanceof UnrecoverableError || ctx.isFinalAttempt;
      if (final && this.definition.onFailed) await this.definition.onFailed(ctx, err instanceof Error ? err : new Error(String(err)));
      throw err;
    }
  };

  /** A part job's handler: does the part's work, reports the step's count of finished parts, returns the result. */
  readonly runPart = async (ctx: CC): Promise<FlowValue> => {
    const { step: name, part, parts } = ctx.payload;
    const step = this.definition.steps.find((s) => s.name === name);
    if (!step?.part) throw new UnrecoverableError(`this flow has no step "${name}" with parts`);
    const parentId = ctx.job.parent?.id;
    if (!parentId || !ctx.job.parentKey) throw new UnrecoverableError(`part ${part + 1} of step "${name}" has no parent job`);
    const startMs = Date.now();
    const result = (await step.part(ctx)) ?? null;
    logStepTime(parentId, name, `part ${part + 1}/${parts}`, startMs);
    // A run that lost its lock (its process froze past it and the part was taken again) will not be
    // allowed to complete: it must not report either, or a late count could overwrite a later stage.
    if (!(await this.holdsLock(ctx))) return result;
    try {
      // This part is not yet in the parent's processed hash (it completes after returning): count it in.
      const done = Math.min(parts, (await this.countDone(ctx, name)) + 1);
      await this.progress(ctx, parentId, step, done, parts);
    } catch (err) {
      // Progress is for people to watch; failing to write it must not redo the part's work.
      console.warn(`[flow] progress of ${ctx.jobId} not written: ${err instanceof Error ? err.message : String(err)}`);
    }
    return result;
  };

  private async runSteps(ctx: PC): Promise<Record<string, FlowValue>> {
    const { job } = ctx;
    if (!job.id || job.id.includes(":")) throw new UnrecoverableError(`a stepped flow needs a job id without ':' (got ${job.id})`);
    let state = readState(job.data);
    while (state.step < this.definition.steps.length) {
      const step = this.definition.steps[state.step];
      const stepCtx: StepContext<PC> = { ...ctx, values: state.values };
      let results: FlowValue[] = [];
      if (step.parts) {
        const settled = await this.settleParts(ctx, stepCtx, step, state);
        state = settled.state;
        results = settled.results;
      } else {
        await ctx.report(step.stage ?? step.name, 0);
      }
      const startMs = Date.now();
      const value = step.run ? await step.run(stepCtx, results) : null;
      if (step.run) logStepTime(job.id, step.name, "run", startMs);
      state = { step: state.step + 1, values: { ...state.values, [step.name]: value ?? null } };
      await this.saveState(job, state);
    }
    return state.values;
  }

  private async saveState(job: Job, state: FlowState): Promise<void> {
    await job.updateData({ ...(job.data as Record<string, unknown>), [FLOW_STATE_KEY]: state });
  }

  /**
   * Queues the step's parts if it has not yet, and waits for them (throws WaitingChildrenError, and the
   * parent is processed again when they are done). Returns their results in part order once all are in.
   */
  private async settleParts(ctx: PC, stepCtx: StepContext<PC>, step: FlowStep<PC, CC>, state: FlowState): Promise<{ state: FlowState; results: FlowValue[] }> {
    const { job } = ctx;
    const stage = step.stage ?? step.name;
    let requeued = false;
    if (state.queued === undefined) {
      const specs = await step.parts!(stepCtx);
      if (specs.length === 0) return { state, results: [] };
      await this.addMissingParts(ctx, step, specs);
      state = { ...state, queued: specs.length };
      await this.saveState(job, state);
      await this.progress(ctx, job.id!, step, 0, specs.length);
    }
    const total = state.queued!;
    for (;;) {
      const results = await this.readResults(job, step.name, total);
      if (results.length === total) {
        await this.progress(ctx, job.id!, step, total, total);
        return { state, results };
      }
      await this.failOnFailedParts(job, step.name, total);
      if (!ctx.token) throw new Error(`the worker gave job ${job.id} no lock token; a stepped flow cannot wait for its parts without it`);
      // False when none is pending any more: the last ones finished while this ran.
      if (await job.moveToWaitingChildren(ctx.token)) throw new WaitingChildrenError();
      if ((await this.readResults(job, step.name, total)).length === total) continue;
      // Nothing pending, yet results are missing: a part's job is gone (removed by hand). Queue those again, once.
      if (requeued) throw new Error(`parts of step "${step.name}" are missing and none is pending after queueing them again`);
      requeued = true;
      const specs = await step.parts!(stepCtx);
      if (specs.length !== total) throw new UnrecoverableError(`step "${step.name}" now gives ${specs.length} parts where it gave ${total}`);
      await this.addMissingParts(ctx, step, specs);
      await ctx.report(stage, results.length / total);
    }
  }

  /** Results of one step's parts by index; a part counts once whatever its runs, as its job key is its index. */
  private async readResults(job: Job, step: string, total: number): Promise<FlowValue[]> {
    const prefix = partIdPrefix(job, step);
    const byIndex = new Map<number, FlowValue>();
    for (const [key, value] of Object.entries((await job.getChildrenValues<FlowValue>()) ?? {})) {
      const id = key.slice(key.lastIndexOf(":") + 1);
      if (!id.startsWith(prefix)) continue;
      const index = Number(id.slice(prefix.length));
      if (Number.isInteger(index) && index >= 0 && index < total) byIndex.set(index, value);
    }
    if (byIndex.size < total) return [...byIndex.values()];
    return Array.from({ length: total }, (_, i) => byIndex.get(i)!);
  }

  /** A part that failed on its last attempt ends the flow: the parts not yet started are removed. */
  private async failOnFailedParts(job: Job, step: string, total: number): Promise<void> {
    const prefix = partIdPrefix(job, step);
    const failures: { index: number; reason: string }[] = [];
    for (const [key, reason] of Object.entries((await job.getIgnoredChildrenFailures()) ?? {})) {
      const id = key.slice(key.lastIndexOf(":") + 1);
      if (id.startsWith(prefix)) failures.push({ index: Number(id.slice(prefix.length)), reason });
    }
    if (failures.length === 0) return;
    await job.removeUnprocessedChildren();
    const first = failures.sort((a, b) => a.index - b.index)[0];
    throw new UnrecoverableError(`part ${first.index + 1} of ${total} of step "${step}" failed: ${first.reason}`);
  }

  /**
   * Adds the parts that are neither done, pending nor failed. Each has its deterministic id, so a part
   * that exists already is never added again (and a failed one is never put back among the pending).
   */
  private async addMissingParts(ctx: PC, step: FlowStep<PC, CC>, specs: PartIds<CC>[]): Promise<void> {
    const { job } = ctx;
    const prefix = partIdPrefix(job, step.name);
    const deps = await job.getDependencies();
    const known = new Set<string>();
    for (const key of [...Object.keys(deps.processed ?? {}), ...(deps.unprocessed ?? []), ...Object.keys(deps.ignored ?? {})]) {
      known.add(key.slice(key.lastIndexOf(":") + 1));
    }
    const { partJob, partQueue, partAttempts } = this.definition;
    const queue = ctx.queue(partQueue);
    const toAdd = specs
      .map((ids, index) => ({ ids, index, id: `${prefix}${index}` }))
      .filter((p) => !known.has(p.id))
      .map((p) => ({
        name: partJob,
        data: { ...(p.ids as Record<string, unknown>), step: step.name, part: p.index, parts: specs.length } satisfies PartFields,
        opts: { ...PART_JOB_OPTIONS, jobId: p.id, attempts: partAttempts, parent: { id: job.id!, queue: job.queueQualifiedName } },
      }));
    for (let i = 0; i < toAdd.length; i += ADD_BATCH) await queue.addBulk(toAdd.slice(i, i + ADD_BATCH));
  }

  /** True while this run still holds the part's lock (BullMQ keeps the holder's token at `<job key>:lock`). */
  private async holdsLock(ctx: CC): Promise<boolean> {
    if (!ctx.token) return true;
    return (await ctx.redis.get(`${ctx.job.queueQualifiedName}:${ctx.jobId}:lock`)) === ctx.token;
  }

  /** Finished parts of one step, counted in the parent's processed hash by their ids' prefix. */
  private async countDone(ctx: CC, step: string): Promise<number> {
    const own = ctx.jobId;
    const idPrefix = own.slice(0, own.length - String(ctx.payload.part).length);
    if (!own.endsWith(`__${step}__${ctx.payload.part}`)) throw new Error(`part job id ${own} does not name its step and index`);
    const pattern = `${escapeGlob(`${ctx.job.queueQualifiedName}:${idPrefix}`)}*`;
    let cursor = "0";
    let count = 0;
    do {
      const [next, entries] = await ctx.redis.hscan(`${ctx.job.parentKey}:processed`, cursor, "MATCH", pattern, "COUNT", 500);
      cursor = next;
      count += entries.length / 2;
    } while (cursor !== "0");
    return count;
  }

  private async progress(ctx: PC | CC, parentId: string, step: FlowStep<PC, CC>, done: number, total: number): Promise<void> {
    const stage = step.stage ?? step.name;
    if (parentId === ctx.jobId) await ctx.report(stage, done / total);
    else await ctx.reportJob(parentId, stage, done / total);
    await this.definition.onProgress?.(ctx, { step: step.name, stage, done, total });
  }
}

export function defineSteppedFlow<PC extends FlowJobContext<unknown>, CC extends FlowJobContext<PartFields>>(
  definition: SteppedFlowDefinition<PC, CC>,
): SteppedFlow<PC, CC> {
  return new SteppedFlow(definition);
}

/** The parts of a part job's id: its parent's id and creation time, its step and index. */
export function parsePartJobId(id: string): { parentId: string; parentTimestamp: number; step: string; index: number } {
  const pieces = id.split("__");
  const [ts, step, index] = pieces.slice(-3);
  if (pieces.length < 4 || !/^\d+$/.test(ts) || !STEP_NAME.test(step) || !/^\d+$/.test(index)) throw new Error(`${id} is not a part job id`);
  return { parentId: pieces.slice(0, -3).join("__"), parentTimestamp: Number(ts), step, index: Number(index) };
}
