// The export of an edition that is under way, if any. An export whose job the
// queue has given up on (a worker killed twice mid-bundle: BullMQ fails it as
// stalled without the handler's catch) or lost (the enqueue failed) would
// otherwise stay "queued" or "running" and block its edition for good: such an
// export is marked failed here, where every caller looks, and does not count.
import { and, eq, inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { editionExports, jobRuns } from "@/db/schema";
import { jobIdFor } from "@/lib/queue/enqueue";

export const STALE_EXPORT_REASON = "the worker stopped before finishing this bundle; export again.";

export async function findActiveExport(db: DbOrTx, editionId: string): Promise<{ id: string; state: "queued" | "running" } | null> {
  const rows = await db
    .select({ id: editionExports.id, state: editionExports.state, job: jobRuns.state })
    .from(editionExports)
    .leftJoin(jobRuns, eq(jobRuns.id, sql`'edition.export__exportId=' || ${editionExports.id}::text`))
    .where(and(eq(editionExports.editionId, editionId), inArray(editionExports.state, ["queued", "running"])));
  let active: { id: string; state: "queued" | "running" } | null = null;
  for (const r of rows) {
    if (r.job === null || r.job === "failed") {
      await db
        .update(editionExports)
        .set({ state: "failed", error: STALE_EXPORT_REASON, stage: "Failed", finishedAt: sql`now()` })
        .where(and(eq(editionExports.id, r.id), inArray(editionExports.state, ["queued", "running"])));
    } else active = { id: r.id, state: r.state as "queued" | "running" };
  }
  return active;
}

/** The job id the export's job_runs row has (lib/queue/enqueue.ts jobIdFor). */
export function exportJobId(exportId: string): string {
  return jobIdFor("edition.export", { exportId });
}
