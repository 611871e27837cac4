// Handlers by job name, typed against the shared registry in lib/queue/jobs.ts:
// adding a job there without a handler here is a type error.
import type { JobName, JobPayload } from "@/lib/queue/jobs";
import type { BasicContext, HandlerContext } from "./dispatch";
import { runFlowPart } from "./flows";
import { runComposite } from "./jobs/composite-run";
import { exportEdition } from "./jobs/edition-export";
import { ingestFrame } from "./jobs/frame-ingest";
import { sendMail } from "./jobs/mail-send";
import { resendOutbox } from "./jobs/outbox-resend";
import { runReduction } from "./jobs/reduction-run";
import { sweepUploads } from "./jobs/uploads-sweep";

/** What a handler gets (worker/dispatch.ts): db, jobId, the validated payload, report, isLastAttempt. */
export type JobContext<N extends JobName> = BasicContext<JobPayload<N>>;
/**
 * What a handler that steers its own job gets besides (stepped flows, lib/queue/stepped-flow.ts): the
 * BullMQ job, the worker's lock token, reportJob for another job's progress, queues and Redis on the
 * worker's connection.
 */
export type SteeringJobContext<N extends JobName> = HandlerContext<JobPayload<N>>;

/** A handler's return value becomes the job's result (a flow's part hands its result to the parent this way). */
export type JobHandler<N extends JobName> = (ctx: JobContext<N>) => Promise<unknown>;
export type SteeringJobHandler<N extends JobName> = (ctx: SteeringJobContext<N>) => Promise<unknown>;

export const HANDLERS: { [N in JobName]: JobHandler<N> | SteeringJobHandler<N> } = {
  "mail.send": sendMail,
  "frame.ingest": ingestFrame,
  "reduction.run": runReduction,
  "reduction.part": runFlowPart,
  "uploads.sweep": sweepUploads,
  "composite.run": runComposite,
  "edition.export": exportEdition,
  "outbox.resend": resendOutbox,
};
