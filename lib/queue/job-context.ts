// What a job's handler gets from the worker (worker/dispatch.ts builds it) and
// the one rule for which attempt a run is. Types and one pure function only, so
// that handlers (worker/jobs/), the lib modules that keep each job's lifecycle
// and stepped flows import it without importing the worker.
import { UnrecoverableError, type Job, type Queue } from "bullmq";
import type { Redis } from "ioredis";
import type { Db } from "@/db/client";
import type { JobName, JobPayload } from "./jobs";

/** Which attempt of its job a run is. */
export interface JobAttempt {
  /** 1 on the first run, 2 on the first retry, and so on. */
  attempt: number;
  /**
   * True when no retry follows a failure of this attempt: a job whose failure would
   * leave a row waiting for ever records the failure itself.
   */
  isFinalAttempt: boolean;
}

/** The BullMQ fields the attempt is worked out from. */
type AttemptFields = Pick<Job, "attemptsMade" | "opts">;

/**
 * The attempt of a job, worked out here only. BullMQ's `attemptsMade` counts the
 * attempts that have ended in failure, so a job being run is on attempt
 * attemptsMade + 1, and a job that has just failed (the worker's "failed" event,
 * after the count went up) was on attempt attemptsMade. A stall does not count.
 */
export function attemptOf(job: AttemptFields, when: "running" | "failed" = "running"): JobAttempt {
  const attempt = when === "running" ? job.attemptsMade + 1 : job.attemptsMade;
  return { attempt, isFinalAttempt: attempt >= (job.opts.attempts ?? 1) };
}

/** True when a job that has just failed will not run again: bad input, or its last attempt. */
export function isFailedForGood(job: AttemptFields, err: Error): boolean {
  return err instanceof UnrecoverableError || attemptOf(job, "failed").isFinalAttempt;
}

/** One run of a job, without the database: what a stepped flow needs of any job. */
export interface JobRun<P> extends JobAttempt {
  jobId: string;
  payload: P;
  /** Stage and progress (0..1) of this job, mirrored to PostgreSQL for pages. */
  report(stage: string, fraction: number): Promise<void>;
}

/** What every handler gets: the run and the database. */
export interface BasicJobContext<P> extends JobRun<P> {
  db: Db;
}

/** What a handler that steers its own job (a stepped flow's parent or part, lib/queue/stepped-flow.ts) gets besides. */
export interface SteeringFields {
  job: Job;
  /** The lock token the worker processes this job with; a parent needs it to wait for its parts. */
  token: string | undefined;
  /** Stage and progress of another job (a part reports its parent's). */
  reportJob(jobId: string, stage: string, fraction: number): Promise<void>;
  /** A queue on the worker's connection and prefix. */
  queue(name: string): Queue;
  /** The worker's Redis connection (a part counts its step's finished parts with it). */
  redis: Redis;
}

/** The whole context the worker builds for a job of payload P. */
export type SteeringContext<P> = BasicJobContext<P> & SteeringFields;

/** What a handler of job N gets. */
export type JobContext<N extends JobName> = BasicJobContext<JobPayload<N>>;
export type SteeringJobContext<N extends JobName> = SteeringContext<JobPayload<N>>;

/** A handler's return value becomes the job's result (a flow's part hands its result to the parent this way). */
export type JobHandler<N extends JobName> = (ctx: JobContext<N>) => Promise<unknown>;
export type SteeringJobHandler<N extends JobName> = (ctx: SteeringJobContext<N>) => Promise<unknown>;
