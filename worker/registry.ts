// Handlers by job name, typed against the shared registry in lib/queue/jobs.ts:
// adding a job there without a handler here is a type error.
import type { Db } from "@/db/client";
import type { JobName, JobPayload } from "@/lib/queue/jobs";
import { exportEdition } from "./jobs/edition-export";
import { ingestFrame } from "./jobs/frame-ingest";
import { sendMail } from "./jobs/mail-send";
import { resendOutbox } from "./jobs/outbox-resend";
import { runReduction } from "./jobs/reduction-run";
import { sweepUploads } from "./jobs/uploads-sweep";

export interface JobContext<N extends JobName> {
  db: Db;
  jobId: string;
  payload: JobPayload<N>;
  /** Reports stage and progress (0..1); mirrored to PostgreSQL. */
  report: (stage: string, fraction: number) => Promise<void>;
  /** True on the job's last attempt: a handler whose failure would leave a row waiting for ever records the failure itself. */
  isLastAttempt: boolean;
}

export type JobHandler<N extends JobName> = (ctx: JobContext<N>) => Promise<void>;

export const HANDLERS: { [N in JobName]: JobHandler<N> } = {
  "mail.send": sendMail,
  "frame.ingest": ingestFrame,
  "reduction.run": runReduction,
  "uploads.sweep": sweepUploads,
  "edition.export": exportEdition,
  "outbox.resend": resendOutbox,
};
