import { ingestFrameJob } from "@/lib/bracket-sets/ingest";
import type { JobHandler } from "@/lib/queue/job-context";

/** Reads one uploaded original; the frame's states are lib/bracket-sets/ingest.ts's. */
export const ingestFrame: JobHandler<"frame.ingest"> = (ctx) => ingestFrameJob(ctx);
