import { UnrecoverableError } from "bullmq";
import { CompositeRefusedError, runCompositeJob } from "@/lib/composites/run";
import type { JobHandler } from "@/lib/queue/job-context";

/** One composite of finished reductions (lib/composites/run.ts keeps its states); a refusal is not retried. */
export const runComposite: JobHandler<"composite.run"> = async ({ db, payload, isFinalAttempt }) => {
  try {
    return await runCompositeJob(db, payload.compositeId, { isFinalAttempt });
  } catch (error) {
    if (error instanceof CompositeRefusedError) throw new UnrecoverableError(error.message);
    throw error;
  }
};
