// Mail about bracket sets and reductions, through the outbox. A message with a
// fixed outbox id is written once however often the caller runs (a retried
// job), and queued for sending while it is still pending.
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { outboxMessages } from "@/db/schema";
import type { MailDraft } from "@/lib/email/outbox";
import { enqueue } from "@/lib/queue/enqueue";

/** A link into the app, from APP_URL (validated at start in the web app and the worker). */
export function appLink(path: string): string {
  return `${(process.env.APP_URL ?? "").replace(/\/+$/, "")}${path}`;
}

/** Writes the message under `outboxId` unless it exists, then queues it unless it was sent already. */
export async function queueMailOnce(db: DbOrTx, outboxId: string, draft: MailDraft): Promise<void> {
  await db.insert(outboxMessages).values({ id: outboxId, ...draft }).onConflictDoNothing({ target: outboxMessages.id });
  const [row] = await db.select({ state: outboxMessages.state }).from(outboxMessages).where(eq(outboxMessages.id, outboxId)).limit(1);
  // The mail job's id follows from the outbox id, so queueing twice sends once.
  if (row?.state === "pending") await enqueue(db, "mail.send", { outboxId });
}
