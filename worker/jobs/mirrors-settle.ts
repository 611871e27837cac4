import type { SteeringJobHandler } from "@/lib/queue/job-context";
import { JOBS } from "@/lib/queue/jobs";
import { failReductionGivenUp } from "@/lib/reductions/run";
import { settleStrandedMirrors } from "../mirror";

// A mirror must stay untouched this long before BullMQ's state is asked: longer than the moment
// between a job's end in Redis and its "completed" event's write.
const UNTOUCHED_MS = 60_000;

// Settles job mirrors that BullMQ's events never reached (worker/mirror.ts). Scheduled every minute by the worker.
// A steering handler only for the queues on its worker's connection and prefix: it looks jobs up, never steers its own.
export const settleMirrors: SteeringJobHandler<"mirrors.settle"> = async ({ db, queue, report }) => {
  const settled = await settleStrandedMirrors(db, (name) => (Object.hasOwn(JOBS, name) ? queue(JOBS[name as keyof typeof JOBS].queue) : undefined), UNTOUCHED_MS);
  if (settled.length) console.log(`[worker] mirrors: settled ${settled.map((s) => `${s.id} ${s.state}`).join(", ")}`);
  // What the lost "failed" event would have done besides (worker/index.ts): a reduction given up on is ended.
  for (const { state, job } of settled) {
    if (state === "failed" && job.name === "reduction.run") await failReductionGivenUp(db, job, new Error(job.failedReason || "failed"), true);
  }
  await report(`settled ${settled.length}`, 1);
};
