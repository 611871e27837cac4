// Queue a message: write it to the outbox, then enqueue a job with its id.
import { randomUUID } from "node:crypto";
import { and, eq, lt, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { outboxMessages, type OutboxMessage } from "@/db/schema";
import { enqueue, getQueue, jobIdFor } from "@/lib/queue/enqueue";
import { getTransport, mailFrom } from "./transport";

export interface MailDraft {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export async function queueMail(db: DbOrTx, draft: MailDraft): Promise<string> {
  const id = randomUUID();
  await db.insert(outboxMessages).values({ id, ...draft });
  await enqueue(db, "mail.send", { outboxId: id });
  return id;
}

export async function findOutboxMessage(db: DbOrTx, id: string): Promise<OutboxMessage | undefined> {
  const [row] = await db.select().from(outboxMessages).where(eq(outboxMessages.id, id)).limit(1);
  return row;
}

/** Sends one outbox message; a message already sent is not sent again. */
export async function deliverOutboxMessage(db: DbOrTx, id: string): Promise<"sent" | "already-sent"> {
  const msg = await findOutboxMessage(db, id);
  if (!msg) throw new Error(`outbox message ${id} does not exist`);
  if (msg.state === "sent") return "already-sent";
  await getTransport().sendMail({ from: mailFrom(), to: msg.to, subject: msg.subject, text: msg.text, html: msg.html ?? undefined });
  await db.update(outboxMessages).set({ state: "sent", sentAt: sql`now()`, error: null }).where(eq(outboxMessages.id, id));
  return "sent";
}

export async function markOutboxFailed(db: DbOrTx, id: string, error: string): Promise<void> {
  await db.update(outboxMessages).set({ state: "failed", error }).where(eq(outboxMessages.id, id));
}

/**
 * Queues again the pending messages older than `olderThanMs` that have no job
 * in the mail queue: the enqueue after a commit can fail (Redis restarting),
 * which would leave a message in the outbox with nothing to send it. A message
 * whose job exists (waiting, retrying, or failed for good) is left to it.
 * Run every few minutes by the worker (job outbox.resend). Returns the ids queued.
 */
export async function resendStrandedMail(db: DbOrTx, olderThanMs = 2 * 60_000, limit = 200): Promise<string[]> {
  const rows = await db
    .select({ id: outboxMessages.id })
    .from(outboxMessages)
    .where(and(eq(outboxMessages.state, "pending"), lt(outboxMessages.createdAt, new Date(Date.now() - olderThanMs))))
    .orderBy(outboxMessages.createdAt)
    .limit(limit);
  const queue = getQueue("mail");
  const queued: string[] = [];
  for (const { id } of rows) {
    if (await queue.getJob(jobIdFor("mail.send", { outboxId: id }))) continue;
    await enqueue(db, "mail.send", { outboxId: id });
    queued.push(id);
  }
  return queued;
}
