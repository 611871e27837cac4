// Fault: Redis goes down hard (SIGKILL) while a queue of jobs is being worked
// through, and comes back. With append-only persistence fsynced on every write
// (DESIGN.md section 5) no job may be lost and none may take effect twice: every
// frame is ingested once, every mail arrives once, and the worker rides it out.
// Redis and the worker here are our own: a private redis-server in a temporary
// folder and the production worker pointed at it with its own queue prefix.
import { createHash, randomUUID } from "node:crypto";
import { Queue } from "bullmq";
import { eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { frames, jobRuns, outboxMessages } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { sendStagedMail, stageMail } from "@/lib/email/outbox";
import { closeProducerRedis, createRedis } from "@/lib/queue/connection";
import { closeQueues, jobIdFor } from "@/lib/queue/enqueue";
import { isScheduledJob } from "@/lib/queue/jobs";
import { MAILBOX, requireTestDatabase } from "../support/env";
import { startOwnRedis, startOwnWorker, type OwnProcess, type OwnRedis } from "../support/processes";
import { makePatternFits } from "../support/synthetic-fits";
import { waitFor } from "../support/wait";
import { createMember, createSetFor, uploadFile } from "./bracket-upload-helpers";

requireTestDatabase();
const PREFIX = `crownlight-faults-redis-${process.pid}`;
const saved = { REDIS_URL: process.env.REDIS_URL, QUEUE_PREFIX: process.env.QUEUE_PREFIX };
const FRAME_COUNT = 20;
const MAILS_BEFORE = 10;
const MAILS_AFTER = 10;

const db = getDb();
let redis: OwnRedis;
let worker: OwnProcess | undefined;
let owner: Actor;
let setId: string;
const sentBytes = new Map<string, Uint8Array>();
const frameIds: string[] = [];
const mailIds: string[] = [];
const recipient = `restart.${randomUUID().slice(0, 8)}@faults-test.example`;

afterAll(async () => {
  await worker?.kill("SIGKILL");
  await closeQueues();
  await closeProducerRedis();
  await redis?.stop();
  await closeDb();
  Object.assign(process.env, saved);
});

async function queueTestMail(n: number): Promise<void> {
  const id = await stageMail(db, { to: recipient, subject: `Restart check ${n}`, text: `Message ${n} of a queue that outlives a Redis restart.` });
  await sendStagedMail(db, [id]);
  mailIds.push(id);
}

async function countIngested(): Promise<number> {
  const rows = await db.select({ state: frames.ingestState }).from(frames).where(eq(frames.bracketSetId, setId));
  return rows.filter((r) => r.state !== "received").length;
}

beforeAll(async () => {
  redis = await startOwnRedis();
  // Before any queue or producer connection exists: everything this file enqueues goes to the private Redis.
  process.env.REDIS_URL = redis.url;
  process.env.QUEUE_PREFIX = PREFIX;
  owner = await createMember(db, "Rosa Restart");
  setId = await createSetFor(db, owner, "Redis restart bracket");
  // Frames of 600 x 400 px: each ingest takes a noticeable moment, so the queue is still long when Redis goes down.
  for (let i = 0; i < FRAME_COUNT; i++) {
    const name = `restart-${String(i + 1).padStart(2, "0")}.fits`;
    const bytes = makePatternFits(600, 400, i + 1);
    sentBytes.set(name, bytes);
    frameIds.push((await uploadFile(db, owner, setId, name, bytes)).id);
  }
  for (let i = 1; i <= MAILS_BEFORE; i++) await queueTestMail(i);
}, 180_000);

describe("Redis restarted during a queue of jobs", () => {
  it("loses no job and runs none twice", async () => {
    worker = await startOwnWorker("redis-restart", { REDIS_URL: redis.url, QUEUE_PREFIX: PREFIX });
    const before = await waitFor("a few ingests before the restart", async () => {
      const n = await countIngested();
      if (n === FRAME_COUNT) throw new Error("every frame was ingested before Redis could be restarted; make the frames larger");
      return n >= 3 ? n : undefined;
    }, 120_000, 50);
    await redis.crash();
    const atCrash = await countIngested();
    // Down for a moment; the worker's and the producer's connections keep retrying meanwhile.
    await new Promise((r) => setTimeout(r, 1500));
    await redis.start();
    const restartedAt = Date.now();
    for (let i = MAILS_BEFORE + 1; i <= MAILS_BEFORE + MAILS_AFTER; i++) await queueTestMail(i);

    await waitFor("every ingest after the restart", async () => ((await countIngested()) === FRAME_COUNT ? true : undefined), 240_000, 500);
    await waitFor("every mail after the restart", async () => {
      const rows = await db.select({ state: outboxMessages.state }).from(outboxMessages).where(inArray(outboxMessages.id, mailIds));
      return rows.every((r) => r.state === "sent") ? true : undefined;
    }, 120_000, 500);
    console.info(`[faults] Redis killed with ${atCrash} of ${FRAME_COUNT} frames ingested; the rest and every mail done ${((Date.now() - restartedAt) / 1000).toFixed(1)} s after the restart`);
    // The restart happened with work still queued.
    expect(before).toBeGreaterThanOrEqual(3);
    expect(atCrash).toBeLessThan(FRAME_COUNT);

    // Every frame ingested once, from its own bytes.
    const rows = await db.select().from(frames).where(eq(frames.bracketSetId, setId));
    expect(rows).toHaveLength(FRAME_COUNT);
    for (const f of rows) {
      expect([f.originalFileName, f.ingestState, f.refusalReason]).toEqual([f.originalFileName, "ingested", null]);
      expect(f.sha256).toBe(createHash("sha256").update(sentBytes.get(f.originalFileName)!).digest("hex"));
      expect(f.thumbnailKey).not.toBeNull();
    }

    // Every job completed in BullMQ and is mirrored as done.
    const ids = [...frameIds.map((frameId) => jobIdFor("frame.ingest", { frameId })), ...mailIds.map((outboxId) => jobIdFor("mail.send", { outboxId }))];
    // The mirror follows BullMQ's "completed" event, a moment after a handler's own writes. A job
    // whose handler finished while Redis was down loses its lock, so BullMQ refuses to mark it
    // finished ("Missing lock"); the stalled check takes it again on its second look (two intervals
    // of 30 s, longer on a loaded machine), and only that run's completion settles its mirror.
    let unsettled: string[] = [];
    const runs = await waitFor("every job's mirror to settle", async () => {
      const rows = await db.select({ id: jobRuns.id, state: jobRuns.state }).from(jobRuns).where(inArray(jobRuns.id, ids));
      unsettled = rows.filter((r) => r.state !== "done" && r.state !== "failed").map((r) => `${r.id} ${r.state}`);
      return unsettled.length === 0 ? rows : undefined;
    }, 180_000).catch((err: Error) => {
      throw new Error(`${err.message}; still open: ${unsettled.join(", ")}`);
    });
    expect(runs.filter((r) => r.state !== "done")).toEqual([]);
    expect(runs).toHaveLength(ids.length);
    const connection = createRedis(redis.url, false);
    const queues = { media: new Queue("media", { connection, prefix: PREFIX }), mail: new Queue("mail", { connection, prefix: PREFIX }) };
    try {
      // Nothing is left failed, and nothing of this test's is left open. The worker's scheduled
      // runs come and go on their own clocks: one may be waiting or running now.
      for (const [name, queue] of Object.entries(queues)) {
        const failed = await queue.getJobs(["failed"], 0, -1);
        const open = await queue.getJobs(["waiting", "active"], 0, -1);
        expect([name, failed.map((job) => `${job.name} ${job.id}`), open.filter((job) => !isScheduledJob(job.name)).map((job) => job.id)]).toEqual([name, [], []]);
      }
      for (const id of ids) {
        const job = await (id.startsWith("frame.ingest") ? queues.media : queues.mail).getJob(id);
        expect([id, await job?.getState()]).toEqual([id, "completed"]);
      }
    } finally {
      await Promise.all(Object.values(queues).map((q) => q.close()));
      connection.disconnect();
    }

    // Each mail reached the SMTP fake exactly once: a job run twice would send twice.
    const res = await fetch(`${MAILBOX}/api/messages?to=${encodeURIComponent(recipient)}`);
    const subjects = ((await res.json()) as { subject: string }[]).map((m) => m.subject).sort();
    const want = Array.from({ length: MAILS_BEFORE + MAILS_AFTER }, (_, i) => `Restart check ${i + 1}`).sort();
    expect(subjects).toEqual(want);

    // The same worker process rode out the outage.
    expect(worker.isRunning()).toBe(true);
  }, 600_000);
});
