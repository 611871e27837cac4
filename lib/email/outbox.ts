// Queue a message: write it to the outbox, then enqueue a job with its id.
import { randomUUID } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { outboxMessages, type OutboxMessage } from "@/db/schema";
import { enqueue } from "@/lib/queue/enqueue";
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
