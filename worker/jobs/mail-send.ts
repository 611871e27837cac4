import { UnrecoverableError } from "bullmq";
import { findOutboxMessage, deliverOutboxMessage } from "@/lib/email/outbox";
import type { JobHandler } from "@/lib/queue/job-context";

// Sends one outbox message. A missing message is bad input (no retry); an SMTP
// fault is transient and retried with backoff by BullMQ.
export const sendMail: JobHandler<"mail.send"> = async ({ db, payload, report }) => {
  const msg = await findOutboxMessage(db, payload.outboxId);
  if (!msg) throw new UnrecoverableError(`outbox message ${payload.outboxId} does not exist`);
  await report("sending", 0.5);
  const result = await deliverOutboxMessage(db, payload.outboxId);
  await report(result, 1);
};
