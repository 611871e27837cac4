// Mirrors BullMQ job state into job_runs, which the UI reads.
import type { Queue } from "bullmq";
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

/** Finds a job by its mirror's name: the queue it runs on, or undefined for a name no longer known. */
export type QueueOfJob = (jobName: string) => Queue | undefined;

/**
 * Settles mirrors that BullMQ's events never reached. A job can finish in Redis
 * without its worker hearing of it: when Redis goes down as it completes, the
 * write is kept but the reply is lost, the client sends it again, and the second
 * try fails for want of a lock, so neither "completed" nor "failed" is emitted and
 * the mirror stays "running" for good. Every mirror still open and untouched for
 * `olderThanMs` is looked up in its queue: one that BullMQ holds as completed or
 * failed takes that state; any other, or a job this worker's queues do not know
 * (another prefix, or removed), is left as it is.
 */
export async function settleStrandedMirrors(db: Db, queueOf: QueueOfJob, olderThanMs: number, pageSize = 200): Promise<{ id: string; state: "done" | "failed" }[]> {
  const settled: { id: string; state: "done" | "failed" }[] = [];
  // Page by id through every open mirror: a backlog of jobs still waiting (open, untouched, and
  // rightly left) must not keep the settle from the stranded ones behind it.
  let after = "";
  for (;;) {
    const page = await db
      .select({ id: jobRuns.id, name: jobRuns.name })
      .from(jobRuns)
      .where(
        and(
          inArray(jobRuns.state, ["queued", "running"]),
          lt(jobRuns.updatedAt, sql`now() - make_interval(secs => ${olderThanMs / 1000})`),
          gt(jobRuns.id, after),
        ),
      )
      .orderBy(jobRuns.id)
      .limit(pageSize);
    for (const run of page) {
      const job = await queueOf(run.name)?.getJob(run.id);
      if (!job) continue;
      const state = await job.getState();
      if (state === "completed") {
        await mirrorJob(db, run.id, { state: "done", progress: 1, error: null });
        settled.push({ id: run.id, state: "done" });
      } else if (state === "failed") {
        await mirrorJob(db, run.id, { state: "failed", error: job.failedReason || "failed", attempts: job.attemptsMade });
        settled.push({ id: run.id, state: "failed" });
      }
    }
    if (page.length < pageSize) return settled;
    after = page[page.length - 1].id;
  }
}
