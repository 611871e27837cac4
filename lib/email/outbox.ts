// The outbox: every e-mail the app sends is first a row here, written in the
// same transaction as the change it tells of (stageMail), and queued for the
// mail.send job only after that transaction has committed (sendStagedMail), so
// a change and its mail exist together or not at all, and the job always finds
// its message. A message whose queueing failed after the commit stays pending
// and is queued again by the outbox.resend job (resendStrandedMail).
import { randomUUID } from "node:crypto";
import { and, eq, inArray, lt, sql } from "drizzle-orm";
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

export interface MailMessage extends MailDraft {
  /**
   * A fixed outbox id for a message that must go once however often its writer
   * runs (a retried job): staged again, the message already there is kept.
   * Without it, each call stages a new message.
   */
  id?: string;
}

/**
 * Writes a message into the outbox in the caller's transaction (`tx`, or the
 * database for a message that tells of no change) and returns its id. Nothing
 * is sent until sendStagedMail is called with the id after the commit; a
 * transaction that rolls back takes the message with it.
 */
export async function stageMail(tx: DbOrTx, message: MailMessage): Promise<string> {
  const { id = randomUUID(), ...draft } = message;
  await tx.insert(outboxMessages).values({ id, ...draft }).onConflictDoNothing({ target: outboxMessages.id });
  return id;
}

/**
 * Queues staged messages for sending, once their transaction has committed.
 * Only messages still pending are queued: one sent already (a fixed id staged
 * again) is not sent twice, and one rolled back is not in the outbox at all.
 * The mail job's id follows from the outbox id, so queueing twice sends once.
 */
export async function sendStagedMail(db: DbOrTx, ids: readonly string[]): Promise<void> {
  if (ids.length === 0) return;
  const rows = await db
    .select({ id: outboxMessages.id })
    .from(outboxMessages)
    .where(and(inArray(outboxMessages.id, [...ids]), eq(outboxMessages.state, "pending")));
  const pending = new Set(rows.map((r) => r.id));
  for (const outboxId of ids) if (pending.has(outboxId)) await enqueue(db, "mail.send", { outboxId });
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
