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
