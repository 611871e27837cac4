import { sweepAbandonedUploads } from "@/lib/storage/sweep-uploads";
import type { JobHandler } from "@/lib/queue/job-context";

// Aborts multipart uploads left open longer than the limit (a closed browser
// tab), so S3 keeps no orphaned parts. Scheduled hourly by the worker.
export const sweepUploads: JobHandler<"uploads.sweep"> = async ({ db, report }) => {
  await report("sweeping", 0);
  await sweepAbandonedUploads(db);
  await report("swept", 1);
};
