// The typed job registry shared by producers (lib, app) and the worker. Each
// job has a name, the queue it runs on, a zod payload of ids only, and retry
// settings. Handlers live in worker/jobs/, one file per job.
import { z } from "zod";
import { PART_FIELDS } from "./part-fields";

// "reduce" is its own queue so that long reductions never hold up ingests or mail;
// "export" likewise, so that an editor's print bundle does not wait behind them.
export const QUEUES = ["mail", "media", "reduce", "export"] as const;
export type QueueName = (typeof QUEUES)[number];

export const JOBS = {
  "mail.send": {
    queue: "mail",
    payload: z.object({ outboxId: z.string().min(1) }),
    attempts: 5,
  },
  // Every few minutes: queue again pending mail whose job never reached Redis. Safe to run again
  // (each mail's job id is fixed), so a run that Redis dropped is retried.
  "outbox.resend": {
    queue: "mail",
    payload: z.object({}),
    attempts: 3,
  },
  // Every minute: job mirrors (job_runs) still open whose job BullMQ already finished take its end
  // (worker/mirror.ts says how one is missed). On the mail queue, which is light and runs four at a
  // time, so that a long ingest never holds it up. Safe to run again.
  "mirrors.settle": {
    queue: "mail",
    payload: z.object({}),
    attempts: 3,
  },
  // Reads one uploaded original: checksum, format, metadata, thumbnail.
  "frame.ingest": {
    queue: "media",
    payload: z.object({ frameId: z.uuid() }),
    attempts: 3,
  },
  // Hourly: abort multipart uploads abandoned for longer than the limit (safe to run again).
  "uploads.sweep": {
    queue: "media",
    payload: z.object({}),
    attempts: 3,
  },
  // One reduction of a bracket set: fetch originals, reduce, store outputs.
  "reduction.run": {
    queue: "reduce",
    payload: z.object({ reductionId: z.uuid() }),
    attempts: 3,
  },
  // One part of a reduction run as a stepped flow (lib/queue/stepped-flow.ts): a slice of frames of one
  // step, taken by any worker. Only the parent reduction.run adds parts (once it runs as a flow: see
  // worker/flows.ts), never enqueue().
  "reduction.part": {
    queue: "reduce",
    payload: z.object({ reductionId: z.uuid(), ...PART_FIELDS }),
    attempts: 3,
  },
  // One composite of finished reductions: fetch their masters, compose, store outputs.
  "composite.run": {
    queue: "reduce",
    payload: z.object({ compositeId: z.uuid() }),
    attempts: 3,
  },
  // One print bundle of an edition: sized files with metadata, texts, proof, ZIP.
  "edition.export": {
    queue: "export",
    payload: z.object({ exportId: z.uuid() }),
    attempts: 2,
  },
} as const satisfies Record<string, { queue: QueueName; payload: z.ZodType; attempts: number }>;

export type JobName = keyof typeof JOBS;
export type JobPayload<N extends JobName> = z.infer<(typeof JOBS)[N]["payload"]>;

export function isJobName(name: string): name is JobName {
  return Object.hasOwn(JOBS, name);
}

/**
 * Jobs the worker runs on a clock rather than on demand: each worker upserts these schedules
 * (worker/index.ts), and BullMQ keeps one of each however many workers start. Their runs come and
 * go on the queues beside the jobs enqueue() adds.
 */
export const SCHEDULED_JOBS = [
  // Abandoned multipart uploads aborted every hour.
  { name: "uploads.sweep", schedulerId: "uploads-sweep-hourly", everyMs: 3600_000 },
  // Mail whose job never reached Redis (an enqueue that failed after its commit) queued again every 5 minutes.
  { name: "outbox.resend", schedulerId: "outbox-resend-5min", everyMs: 5 * 60_000 },
  // Job mirrors that a lost event left open settled from BullMQ's own state every minute.
  { name: "mirrors.settle", schedulerId: "mirrors-settle-1min", everyMs: 60_000 },
] as const satisfies readonly { name: JobName; schedulerId: string; everyMs: number }[];

export function isScheduledJob(name: string): boolean {
  return SCHEDULED_JOBS.some((s) => s.name === name);
}
