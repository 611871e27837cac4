// Mirrors BullMQ job state into job_runs, which the UI reads.
import { eq, sql } from "drizzle-orm";
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
