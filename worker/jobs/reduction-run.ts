import { UnrecoverableError, WaitingChildrenError } from "bullmq";
import { eq } from "drizzle-orm";
import { reductions } from "@/db/schema";
import { reductionFlow } from "@/lib/reduction-flow/reduction-flow";
import { notifyReductionOutcome } from "@/lib/reductions/reductions";
import type { SteeringJobHandler } from "@/lib/queue/job-context";

/**
 * One reduction, as a stepped flow whose parts any worker takes
 * (lib/reduction-flow): this job is its parent. A reduction already done is left
 * alone (a repeated job changes nothing but the mail, sent once); a parent taken
 * again after a crash resumes at the step it had reached. Originals are only read.
 */
export const runReduction: SteeringJobHandler<"reduction.run"> = async (ctx) => {
  const { db, payload } = ctx;
  const [red] = await db.select({ id: reductions.id, state: reductions.state }).from(reductions).where(eq(reductions.id, payload.reductionId)).limit(1);
  if (!red) throw new UnrecoverableError(`reduction ${payload.reductionId} does not exist`);
  if (red.state === "done") return notifyReductionOutcome(db, red.id);
  try {
    await reductionFlow.runParent(ctx);
  } catch (err) {
    // Waiting for parts is not a fault; a fault that will be retried shows the reduction queued with its reason.
    if (!(err instanceof WaitingChildrenError) && !(err instanceof UnrecoverableError) && !ctx.isFinalAttempt) {
      await db.update(reductions).set({ state: "queued", error: (err as Error).message }).where(eq(reductions.id, red.id));
    }
    throw err;
  }
  // Outside the flow: a fault in queueing the mail must not put a finished reduction back in the queue.
  await notifyReductionOutcome(db, red.id);
};
