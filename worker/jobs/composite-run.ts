import { UnrecoverableError } from "bullmq";
import { CompositeRefusedError, runCompositeJob } from "@/lib/composites/run";
import type { JobHandler } from "../registry";

/** One composite of finished reductions (lib/composites/run.ts keeps its states); a refusal is not retried. */
export const runComposite: JobHandler<"composite.run"> = async ({ db, payload, isLastAttempt }) => {
  try {
    return await runCompositeJob(db, payload.compositeId, { isLastAttempt });
  } catch (error) {
    if (error instanceof CompositeRefusedError) throw new UnrecoverableError(error.message);
    throw error;
  }
};
