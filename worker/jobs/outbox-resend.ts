import { resendStrandedMail } from "@/lib/email/outbox";
import type { JobHandler } from "@/lib/queue/job-context";

// Queues again pending mail that has no job (lib/email/outbox.ts). Scheduled every 5 minutes by the worker.
export const resendOutbox: JobHandler<"outbox.resend"> = async ({ db, report }) => {
  const queued = await resendStrandedMail(db);
  if (queued.length) console.log(`[worker] outbox: queued ${queued.length} stranded message(s) again`);
  await report(`queued ${queued.length} again`, 1);
};
