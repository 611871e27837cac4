import { reductionFlow } from "@/lib/reduction-flow/reduction-flow";
import type { SteeringJobHandler } from "@/lib/queue/job-context";
import { runReductionJob } from "@/lib/reductions/run";

/** One reduction, as a stepped flow whose parts any worker takes (lib/reduction-flow); its states are lib/reductions/run.ts's. */
export const runReduction: SteeringJobHandler<"reduction.run"> = (ctx) => runReductionJob(ctx, reductionFlow.runParent);
