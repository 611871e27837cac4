// The stepped flows the worker runs (lib/queue/stepped-flow.ts), by the name of
// their part job. A flow's parent job maps to `flow.runParent` in HANDLERS; its
// part job maps to runFlowPart, which finds the flow here.
import { UnrecoverableError } from "bullmq";
import type { JobName } from "@/lib/queue/jobs";
import { reductionFlow } from "@/lib/reduction-flow/reduction-flow";
import type { FlowJobContext, PartFields, SteppedFlow } from "@/lib/queue/stepped-flow";
import type { SteeringJobHandler } from "@/lib/queue/job-context";

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- each flow types its own contexts
export const FLOWS_BY_PART_JOB: Partial<Record<JobName, SteppedFlow<any, any>>> = {
  "reduction.part": reductionFlow,
};

export const runFlowPart: SteeringJobHandler<"reduction.part"> = async (ctx) => {
  const flow = FLOWS_BY_PART_JOB[ctx.job.name as JobName];
  if (!flow) throw new UnrecoverableError(`no stepped flow runs ${ctx.job.name} jobs in this worker`);
  return flow.runPart(ctx as FlowJobContext<PartFields>);
};
