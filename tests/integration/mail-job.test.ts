import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { jobRuns, outboxMessages } from "@/db/schema";
import { resendStrandedMail, sendStagedMail, stageMail } from "@/lib/email/outbox";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues, jobIdFor } from "@/lib/queue/enqueue";
import { requireTestDatabase } from "../support/env";
import { waitForMail } from "../support/mailbox";

requireTestDatabase();
const db = getDb();

afterAll(async () => {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

async function waitForState(id: string, state: string, timeoutMs = 20_000) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const [row] = await db.select().from(jobRuns).where(eq(jobRuns.id, id));
    if (row?.state === state) return row;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`job ${id} did not reach ${state}`);
}

describe("the mail job (real Redis, worker and SMTP fake)", () => {
  it("delivers a queued message and mirrors the job state in PostgreSQL", async () => {
    const to = `reader.${randomUUID().slice(0, 8)}@mail-test.example`;
    const subject = `Bracket received ${randomUUID().slice(0, 6)}`;
    const id = await stageMail(db, { to, subject, text: "Your 27 frames from Luxor are in." });
    await sendStagedMail(db, [id]);

    const mail = await waitForMail(to, (m) => m.subject === subject);
    expect(mail.text).toContain("27 frames from Luxor");

    const run = await waitForState(jobIdFor("mail.send", { outboxId: id }), "done");
    expect(run.progress).toBe(1);
    const [msg] = await db.select().from(outboxMessages).where(eq(outboxMessages.id, id));
    expect(msg.state).toBe("sent");
    expect(msg.sentAt).not.toBeNull();
  });

  it("sends nothing staged in a transaction that rolls back, and nothing staged until it is sent", async () => {
    const to = `rolled.back.${randomUUID().slice(0, 8)}@mail-test.example`;
    let stagedId = "";
    await expect(
      db.transaction(async (tx) => {
        stagedId = await stageMail(tx, { to, subject: "Approved: a set that stayed on the desk", text: "Approved." });
        // Staged, not yet queued: no job exists while the transaction is open.
        expect(await db.select().from(jobRuns).where(eq(jobRuns.id, jobIdFor("mail.send", { outboxId: stagedId })))).toEqual([]);
        throw new Error("the decision was overtaken");
      }),
    ).rejects.toThrow("the decision was overtaken");
    expect(await db.select().from(outboxMessages).where(eq(outboxMessages.id, stagedId))).toEqual([]);
    // Sending the rolled-back id after the fact queues nothing either.
    await sendStagedMail(db, [stagedId]);
    expect(await db.select().from(jobRuns).where(eq(jobRuns.id, jobIdFor("mail.send", { outboxId: stagedId })))).toEqual([]);
  });

  it("keeps one message under a fixed id however often it is staged, and sends it once", async () => {
    const to = `once.${randomUUID().slice(0, 8)}@mail-test.example`;
    const id = `once-${randomUUID()}`;
    const subject = `Your reduction finished ${id.slice(5, 11)}`;
    await sendStagedMail(db, [await stageMail(db, { id, to, subject, text: "First writing." })]);
    await waitForState(jobIdFor("mail.send", { outboxId: id }), "done");
    // A retried job stages and sends again: the sent message is neither rewritten nor sent twice.
    await sendStagedMail(db, [await stageMail(db, { id, to, subject, text: "Second writing." })]);
    const rows = await db.select().from(outboxMessages).where(eq(outboxMessages.to, to));
    expect(rows.map((r) => [r.id, r.text, r.state])).toEqual([[id, "First writing.", "sent"]]);
    const [run] = await db.select().from(jobRuns).where(eq(jobRuns.id, jobIdFor("mail.send", { outboxId: id })));
    expect(run.state).toBe("done");
  });

  it("fails a job whose message does not exist, without retrying", async () => {
    const { enqueue } = await import("@/lib/queue/enqueue");
    const missing = randomUUID();
    const jobId = await enqueue(db, "mail.send", { outboxId: missing });
    const run = await waitForState(jobId, "failed");
    expect(run.error).toContain(missing);
    expect(run.attempts).toBeLessThanOrEqual(1);
  });

  it("refuses a payload that does not match the registry", async () => {
    const { enqueue } = await import("@/lib/queue/enqueue");
    await expect(enqueue(db, "mail.send", { outboxId: "" })).rejects.toThrow();
  });

  it("queues again a pending message whose job never reached Redis, once, and leaves young ones alone", async () => {
    const to = `stranded.${randomUUID().slice(0, 8)}@mail-test.example`;
    const strandedId = `stranded-${randomUUID()}`;
    const youngId = `young-${randomUUID()}`;
    // As if the commit went through and the enqueue after it failed: a row, no job.
    await db.insert(outboxMessages).values({ id: strandedId, to, subject: "Your set was approved", text: "Approved.", createdAt: new Date(Date.now() - 10 * 60_000) });
    await db.insert(outboxMessages).values({ id: youngId, to, subject: "Just written", text: "Not yet." });
    const queued = await resendStrandedMail(db);
    expect(queued).toContain(strandedId);
    expect(queued).not.toContain(youngId);
    const mail = await waitForMail(to, (m) => m.subject === "Your set was approved");
    expect(mail.text).toContain("Approved.");
    await waitForState(jobIdFor("mail.send", { outboxId: strandedId }), "done");
    expect(await resendStrandedMail(db)).not.toContain(strandedId);
    await db.delete(outboxMessages).where(eq(outboxMessages.id, youngId));
  });
});
