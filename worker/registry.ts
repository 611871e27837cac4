// Handlers by job name, typed against the shared registry in lib/queue/jobs.ts:
// adding a job there without a handler here is a type error. What a handler
// gets is lib/queue/job-context.ts.
import type { JobHandler, SteeringJobHandler } from "@/lib/queue/job-context";
import type { JobName } from "@/lib/queue/jobs";
import { runFlowPart } from "./flows";
import { runComposite } from "./jobs/composite-run";
import { exportEdition } from "./jobs/edition-export";
import { ingestFrame } from "./jobs/frame-ingest";
import { sendMail } from "./jobs/mail-send";
import { settleMirrors } from "./jobs/mirrors-settle";
import { resendOutbox } from "./jobs/outbox-resend";
import { runReduction } from "./jobs/reduction-run";
import { sweepUploads } from "./jobs/uploads-sweep";

export const HANDLERS: { [N in JobName]: JobHandler<N> | SteeringJobHandler<N> } = {
  "mail.send": sendMail,
  "frame.ingest": ingestFrame,
  "reduction.run": runReduction,
  "reduction.part": runFlowPart,
  "uploads.sweep": sweepUploads,
  "composite.run": runComposite,
  "edition.export": exportEdition,
  "outbox.resend": resendOutbox,
  "mirrors.settle": settleMirrors,
};
