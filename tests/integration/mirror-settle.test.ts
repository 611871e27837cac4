// Job mirrors left open by a lost event (worker/mirror.ts, settleStrandedMirrors,
// and the scheduled job worker/jobs/mirrors-settle.ts): each is settled from the
// state BullMQ itself holds, in the real Redis, and nothing else is touched. The
// jobs run here on a prefix of their own, by a worker that mirrors nothing, as
// when Redis took the "completed" or "failed" event with it.
import { randomUUID } from "node:crypto";
import { Queue, UnrecoverableError, Worker } from "bullmq";
import { eq, inArray, sql } from "drizzle-orm";
import type { Redis } from "ioredis";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { jobRuns, reductions } from "@/db/schema";
import type { SteeringContext } from "@/lib/queue/job-context";
import { createRedis } from "@/lib/queue/connection";
import { settleMirrors } from "@/worker/jobs/mirrors-settle";
import { settleStrandedMirrors } from "@/worker/mirror";
import { requireTestDatabase } from "../support/env";
import { waitFor } from "../support/wait";
import { closeUploadTest, createMember, createSetFor } from "./bracket-upload-helpers";

requireTestDatabase();
const PREFIX = `crownlight-settle-${process.pid}`;
const NAME = "settle.try";
const db = getDb();
const run = randomUUID().slice(0, 8);
const ids = {
  completed: `${NAME}__${run}-completed`,
  failed: `${NAME}__${run}-failed`,
  // Work already done, enqueued again: BullMQ keeps the finished job and adds nothing, the mirror went back to queued.
  requeued: `${NAME}__${run}-requeued`,
  waiting: `${NAME}__${run}-waiting`,
  unknown: `${NAME}__${run}-unknown`,
  fresh: `${NAME}__${run}-fresh`,
};
let redis: Redis;
let queue: Queue;
let reduceQueue: Queue;
let reductionId: string;
let reductionJobId: string;

beforeAll(async () => {
  redis = createRedis(process.env.REDIS_URL!, true);
  queue = new Queue("settle-check", { connection: redis, prefix: PREFIX });
  reduceQueue = new Queue("reduce", { connection: redis, prefix: PREFIX });
  const worker = new Worker(
    "settle-check",
    async (job) => {
      if (job.id === ids.failed) throw new UnrecoverableError("the frame's file is cut short");
      return "ok";
    },
    { connection: redis, prefix: PREFIX },
  );
  await queue.add(NAME, {}, { jobId: ids.completed });
  await queue.add(NAME, {}, { jobId: ids.failed, attempts: 3 });
  await queue.add(NAME, {}, { jobId: ids.requeued });
  await queue.add(NAME, {}, { jobId: ids.fresh });
  await waitFor("the four jobs to end", async () => {
    const counts = await queue.getJobCounts("completed", "failed");
    return counts.completed === 3 && counts.failed === 1 ? true : undefined;
  }, 30_000);
  await worker.close();
  // Added once no worker listens: it stays waiting.
  await queue.add(NAME, {}, { jobId: ids.waiting });

  // Every mirror open, as the dispatcher or enqueue leaves it; all but one untouched for 5 minutes.
  await db.insert(jobRuns).values(
    Object.entries(ids).map(([kind, id]) => ({ id, name: NAME, state: kind === "requeued" ? ("queued" as const) : ("running" as const), attempts: 1, progress: 0.4 })),
  );
  await db
    .update(jobRuns)
    .set({ updatedAt: sql`now() - interval '5 minutes'` })
    .where(inArray(jobRuns.id, [ids.completed, ids.failed, ids.requeued, ids.waiting, ids.unknown]));

  // A reduction whose job BullMQ gave up on (stalled too often) while its "failed" event was lost.
  const owner = await createMember(db, "Sefa Settle");
  const [red] = await db
    .insert(reductions)
    .values({ bracketSetId: await createSetFor(db, owner, "Settle bracket"), requestedBy: owner.userId, params: { registration: "sun", filter: "mgn", recoverResponse: false }, state: "running" })
    .returning({ id: reductions.id });
  reductionId = red.id;
  reductionJobId = `reduction.run__reductionId=${reductionId}`;
  const reduceWorker = new Worker(
    "reduce",
    async () => {
      throw new UnrecoverableError("job stalled more than allowable limit");
    },
    { connection: redis, prefix: PREFIX },
  );
  await reduceQueue.add("reduction.run", { reductionId }, { jobId: reductionJobId, attempts: 3 });
  await waitFor("the reduction's job to fail", async () => ((await reduceQueue.getJobCounts("failed")).failed === 1 ? true : undefined), 30_000);
  await reduceWorker.close();
  await db.insert(jobRuns).values({ id: reductionJobId, name: "reduction.run", state: "running", attempts: 1, updatedAt: sql`now() - interval '5 minutes'` });
});

afterAll(async () => {
  await db.delete(jobRuns).where(inArray(jobRuns.id, [...Object.values(ids), reductionJobId]));
  for (const q of [queue, reduceQueue]) {
    await q.obliterate({ force: true });
    await q.close();
  }
  redis.disconnect();
  await closeUploadTest();
  await closeDb();
});

describe("settling job mirrors from BullMQ's state", () => {
  it("gives a completed job's mirror done and a failed one's failed with its reason and time, and leaves the rest", async () => {
    const queueOf = (name: string) => (name === NAME ? queue : undefined);
    // Pages of two: the mirrors left open (waiting, unknown) sit on pages of their own and must not end the search.
    const settled = await settleStrandedMirrors(db, queueOf, 60_000, 2);
    expect(settled.filter((s) => Object.values(ids).includes(s.id)).map((s) => [s.id, s.state]).sort()).toEqual(
      [
        [ids.completed, "done"],
        [ids.failed, "failed"],
        [ids.requeued, "done"],
      ].sort(),
    );

    const rows = await db.select().from(jobRuns).where(inArray(jobRuns.id, Object.values(ids)));
    const byId = new Map(rows.map((r) => [r.id, r]));
    expect(byId.get(ids.completed)).toMatchObject({ state: "done", progress: 1, error: null });
    expect(byId.get(ids.requeued)).toMatchObject({ state: "done", progress: 1 });
    expect(byId.get(ids.failed)).toMatchObject({ state: "failed", error: "the frame's file is cut short", attempts: 1 });
    // The time BullMQ finished it, not the time of the settle.
    const failedJob = await queue.getJob(ids.failed);
    expect(byId.get(ids.failed)?.finishedAt?.getTime()).toBe(failedJob?.finishedOn);
    // Still waiting in Redis; not in this prefix's queue at all; finished in Redis but touched a moment ago.
    for (const id of [ids.waiting, ids.unknown, ids.fresh]) expect([id, byId.get(id)?.state, byId.get(id)?.progress]).toEqual([id, "running", 0.4]);

    // A second run finds nothing more to settle among these.
    const again = await settleStrandedMirrors(db, queueOf, 60_000);
    expect(again.filter((s) => Object.values(ids).includes(s.id))).toEqual([]);
  });

  it("as the scheduled job, also ends a reduction whose job BullMQ failed, in words for its owner", async () => {
    const report = async () => undefined;
    const queueOnPrefix = (name: string) => (name === "reduce" ? reduceQueue : queue);
    await settleMirrors({ db, queue: queueOnPrefix, report } as unknown as SteeringContext<Record<string, never>>);
    const [mirror] = await db.select().from(jobRuns).where(eq(jobRuns.id, reductionJobId));
    expect(mirror).toMatchObject({ state: "failed", error: "job stalled more than allowable limit" });
    const [red] = await db.select().from(reductions).where(eq(reductions.id, reductionId));
    expect(red.state).toBe("failed");
    expect(red.error).toMatch(/stopped responding more than once/);
  });
});
