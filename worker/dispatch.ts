// From a BullMQ job to its typed handler: the payload is validated again (a stale
// or forged payload is refused without retry), the state is mirrored to
// PostgreSQL, and the handler gets its context (lib/queue/job-context.ts: the
// attempt, the job and the worker's lock token for handlers that steer their
// own job, report functions, queues on the worker's connection). Generic over
// the job registry so that tests can run their own jobs through the same path.
import { Queue, UnrecoverableError, type Job, type Worker } from "bullmq";
import type { Redis } from "ioredis";
import type { z } from "zod";
import type { Db } from "@/db/client";
import { attemptOf, isFailedForGood, type SteeringContext } from "@/lib/queue/job-context";
import { mirrorJob } from "./mirror";

export interface JobDefinition {
  queue: string;
  payload: z.ZodType;
  attempts: number;
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- each handler takes its own payload; the dispatcher checks it against the registry first
export type AnyHandler = (ctx: SteeringContext<any>) => Promise<unknown>;

export interface Dispatcher {
  process: (job: Job, token?: string) => Promise<unknown>;
  queue: (name: string) => Queue;
  close: () => Promise<void>;
}

/** One processor for every queue of a registry; queues for adding jobs are made on the worker's connection. */
export function createDispatcher(options: {
  db: Db;
  connection: Redis;
  prefix: string;
  jobs: Readonly<Record<string, JobDefinition>>;
  handlers: Readonly<Record<string, AnyHandler>>;
}): Dispatcher {
  const { db, connection, prefix, jobs, handlers } = options;
  const queues = new Map<string, Queue>();
  const queue = (name: string): Queue => {
    let q = queues.get(name);
    if (!q) {
      q = new Queue(name, { connection, prefix });
      queues.set(name, q);
    }
    return q;
  };
  const reportJob = async (jobId: string, stage: string, fraction: number) => {
    await mirrorJob(db, jobId, { stage, progress: Math.max(0, Math.min(1, fraction)) });
  };

  const process = async (job: Job, token?: string): Promise<unknown> => {
    const id = job.id ?? "";
    const def = Object.hasOwn(jobs, job.name) ? jobs[job.name] : undefined;
    const handler = Object.hasOwn(handlers, job.name) ? handlers[job.name] : undefined;
    if (!def || !handler) throw new UnrecoverableError(`unknown job ${job.name}`);
    const parsed = def.payload.safeParse(job.data);
    if (!parsed.success) throw new UnrecoverableError(`bad payload for ${job.name}: ${parsed.error.issues[0]?.message}`);
    const { attempt, isFinalAttempt } = attemptOf(job);
    await mirrorJob(db, id, { state: "running", attempts: attempt, error: null });
    const report = async (stage: string, fraction: number) => {
      await job.updateProgress(Math.round(fraction * 100));
      await reportJob(id, stage, fraction);
    };
    return handler({ db, job, token, jobId: id, payload: parsed.data, report, reportJob, attempt, isFinalAttempt, queue, redis: connection });
  };

  const close = async () => {
    await Promise.all([...queues.values()].map((q) => q.close()));
    queues.clear();
  };
  return { process, queue, close };
}

/** Mirrors a worker's outcomes into job_runs: done, or failed for good, or queued again for a retry. */
export function mirrorOutcomes(worker: Worker, db: Db, label: string): void {
  worker.on("completed", (job) => {
    void mirrorJob(db, job.id ?? "", { state: "done", progress: 1 }).catch((e) => console.error("mirror", e));
  });
  worker.on("failed", (job, err) => {
    if (!job) return;
    const final = isFailedForGood(job, err);
    console.error(`[${label}] ${job.name} ${job.id} ${final ? "failed" : "will retry"}: ${err.message}`);
    void mirrorJob(db, job.id ?? "", { state: final ? "failed" : "queued", error: err.message, attempts: attemptOf(job, "failed").attempt }).catch(
      (e) => console.error("mirror", e),
    );
  });
  worker.on("error", (err) => console.error(`[${label}] ${worker.name} queue error:`, err.message));
}
