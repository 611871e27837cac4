// Mirrors BullMQ job state into job_runs, which the UI reads.
import type { Job, Queue } from "bullmq";
import { and, eq, gt, inArray, lt, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { jobRuns, type JobState } from "@/db/schema";

export async function mirrorJob(
  db: Db,
  id: string,
  patch: { state?: JobState; attempts?: number; progress?: number; stage?: string | null; error?: string | null },
): Promise<void> {
  const finished = patch.state === "done" || patch.state === "failed";
  await db
    .update(jobRuns)
    .set({ ...patch, updatedAt: sql`now()`, ...(finished ? { finishedAt: sql`now()` } : {}) })
    .where(eq(jobRuns.id, id));
}

const OPEN: JobState[] = ["queued", "running"];

/** Finds a job by its mirror's name: the queue it runs on, or undefined for a name no longer known. */
export type QueueOfJob = (jobName: string) => Queue | undefined;

/**
 * Settles mirrors that BullMQ's events never reached. A job can finish in Redis
 * without its worker hearing of it: when Redis goes down as it completes, the
 * write is kept but the reply is lost, the client sends it again, and the second
 * try fails for want of a lock, so neither "completed" nor "failed" is emitted and
 * the mirror stays "running" for good. (An enqueue of work already done has the same
 * effect: BullMQ keeps the finished job under its id and adds nothing, while the
 * mirror was set back to "queued".) Every mirror still open and untouched for
 * `olderThanMs` is looked up in its queue: one that BullMQ holds as completed or
 * failed takes that state, with BullMQ's time of finishing; any other, or a job this
 * worker's queues do not know (another prefix, or removed), is left as it is. A
 * mirror that moved on meanwhile (queued again, say) is not written. Returns each
 * settled mirror with its job, for what else a lost event should have done.
 */
export async function settleStrandedMirrors(db: Db, queueOf: QueueOfJob, olderThanMs: number, pageSize = 200): Promise<{ id: string; state: "done" | "failed"; job: Job }[]> {
  const settled: { id: string; state: "done" | "failed"; job: Job }[] = [];
  const cutoff = sql`now() - make_interval(secs => ${olderThanMs / 1000})`;
  const stillOpen = (id: string) => and(eq(jobRuns.id, id), inArray(jobRuns.state, OPEN), lt(jobRuns.updatedAt, cutoff));
  // Page by id through every open mirror: a backlog of jobs still waiting (open, untouched, and
  // rightly left) must not keep the settle from the stranded ones behind it.
  let after = "";
  for (;;) {
    const page = await db
      .select({ id: jobRuns.id, name: jobRuns.name })
      .from(jobRuns)
      .where(and(inArray(jobRuns.state, OPEN), lt(jobRuns.updatedAt, cutoff), gt(jobRuns.id, after)))
      .orderBy(jobRuns.id)
      .limit(pageSize);
    for (const run of page) {
      const job = await queueOf(run.name)?.getJob(run.id);
      if (!job) continue;
      const held = await job.getState();
      if (held !== "completed" && held !== "failed") continue;
      const finishedAt = job.finishedOn ? new Date(job.finishedOn) : sql`now()`;
      const patch =
        held === "completed"
          ? { state: "done" as const, progress: 1, error: null }
          : { state: "failed" as const, error: job.failedReason || "failed", attempts: job.attemptsMade };
      const [written] = await db
        .update(jobRuns)
        .set({ ...patch, updatedAt: sql`now()`, finishedAt })
        .where(stillOpen(run.id))
        .returning({ id: jobRuns.id });
      if (written) settled.push({ id: run.id, state: patch.state, job });
    }
    if (page.length < pageSize) return settled;
    after = page[page.length - 1].id;
  }
}
