// Job mirrors left open by a lost event (worker/mirror.ts, settleStrandedMirrors):
// each is settled from the state BullMQ itself holds, in the real Redis, and
// nothing else is touched. The jobs run here on a queue and prefix of their own,
// by a worker that mirrors nothing, as when Redis took the "completed" event with it.
import { randomUUID } from "node:crypto";
import { Queue, UnrecoverableError, Worker } from "bullmq";
import { inArray, sql } from "drizzle-orm";
import type { Redis } from "ioredis";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { jobRuns } from "@/db/schema";
import { createRedis } from "@/lib/queue/connection";
import { settleStrandedMirrors } from "@/worker/mirror";
import { requireTestDatabase } from "../support/env";
import { waitFor } from "../support/wait";

requireTestDatabase();
const PREFIX = `crownlight-settle-${process.pid}`;
const NAME = "settle.try";
const db = getDb();
const run = randomUUID().slice(0, 8);
const ids = { completed: `${NAME}__${run}-completed`, failed: `${NAME}__${run}-failed`, waiting: `${NAME}__${run}-waiting`, unknown: `${NAME}__${run}-unknown`, fresh: `${NAME}__${run}-fresh` };
let redis: Redis;
let queue: Queue;

beforeAll(async () => {
  redis = createRedis(process.env.REDIS_URL!, true);
  queue = new Queue("settle-check", { connection: redis, prefix: PREFIX });
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
  await queue.add(NAME, {}, { jobId: ids.fresh });
  await waitFor("the three jobs to end", async () => {
    const counts = await queue.getJobCounts("completed", "failed");
    return counts.completed === 2 && counts.failed === 1 ? true : undefined;
  }, 30_000);
  await worker.close();
  // Added once no worker listens: it stays waiting.
  await queue.add(NAME, {}, { jobId: ids.waiting });

  // Every mirror open, as the dispatcher leaves it when the job starts; all but one untouched for 5 minutes.
  await db.insert(jobRuns).values(Object.values(ids).map((id) => ({ id, name: NAME, state: "running" as const, attempts: 1, progress: 0.4 })));
  await db
    .update(jobRuns)
    .set({ updatedAt: sql`now() - interval '5 minutes'` })
    .where(inArray(jobRuns.id, [ids.completed, ids.failed, ids.waiting, ids.unknown]));
});

afterAll(async () => {
  await db.delete(jobRuns).where(inArray(jobRuns.id, Object.values(ids)));
  await queue.obliterate({ force: true });
  await queue.close();
  redis.disconnect();
  await closeDb();
});

describe("settling job mirrors from BullMQ's state", () => {
  it("gives a completed job's mirror done and a failed one's failed with its reason, and leaves the rest", async () => {
    const queueOf = (name: string) => (name === NAME ? queue : undefined);
    // Pages of two: the mirrors left open (waiting, unknown) sit on pages of their own and must not end the search.
    const settled = await settleStrandedMirrors(db, queueOf, 60_000, 2);
    expect(settled.filter((s) => Object.values(ids).includes(s.id)).sort((a, b) => a.id.localeCompare(b.id))).toEqual([
      { id: ids.completed, state: "done" },
      { id: ids.failed, state: "failed" },
    ]);

    const rows = await db.select().from(jobRuns).where(inArray(jobRuns.id, Object.values(ids)));
    const byId = new Map(rows.map((r) => [r.id, r]));
    expect(byId.get(ids.completed)).toMatchObject({ state: "done", progress: 1, error: null });
    expect(byId.get(ids.completed)?.finishedAt).not.toBeNull();
    expect(byId.get(ids.failed)).toMatchObject({ state: "failed", error: "the frame's file is cut short", attempts: 1 });
    // Still waiting in Redis; not in this prefix's queue at all; finished in Redis but touched a moment ago.
    for (const id of [ids.waiting, ids.unknown, ids.fresh]) expect([id, byId.get(id)?.state, byId.get(id)?.progress]).toEqual([id, "running", 0.4]);

    // A second run finds nothing more to settle among these.
    const again = await settleStrandedMirrors(db, queueOf, 60_000);
    expect(again.filter((s) => Object.values(ids).includes(s.id))).toEqual([]);
  });
});
