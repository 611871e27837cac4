// The context the worker's dispatcher gives a handler (worker/dispatch.ts,
// lib/queue/job-context.ts), through real BullMQ retries: each run knows its
// attempt, and only the last one allowed is final.
import { randomUUID } from "node:crypto";
import { Queue, Worker } from "bullmq";
import type { Redis } from "ioredis";
import { z } from "zod";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { createRedis } from "@/lib/queue/connection";
import type { JobAttempt, SteeringContext } from "@/lib/queue/job-context";
import { createDispatcher, mirrorOutcomes, type Dispatcher } from "@/worker/dispatch";
import { requireTestDatabase } from "../support/env";
import { waitFor } from "../support/wait";

requireTestDatabase();
const PREFIX = `crownlight-attempts-${process.pid}`;
const QUEUE = "attempts";
const JOBS = { "try.it": { queue: QUEUE, payload: z.object({ runId: z.string() }), attempts: 3 } } as const;
const db = getDb();
const seen = new Map<string, JobAttempt[]>();
let redis: Redis;
let queue: Queue;
let worker: Worker;
let dispatcher: Dispatcher;

beforeAll(async () => {
  redis = createRedis(process.env.REDIS_URL!, true);
  queue = new Queue(QUEUE, { connection: redis, prefix: PREFIX });
  // Fails until its final attempt, recording what each run was told.
  const handler = async ({ payload, attempt, isFinalAttempt }: SteeringContext<{ runId: string }>) => {
    seen.set(payload.runId, [...(seen.get(payload.runId) ?? []), { attempt, isFinalAttempt }]);
    if (!isFinalAttempt) throw new Error(`attempt ${attempt} fails`);
    return attempt;
  };
  dispatcher = createDispatcher({ db, connection: redis, prefix: PREFIX, jobs: JOBS, handlers: { "try.it": handler } });
  worker = new Worker(QUEUE, dispatcher.process, { connection: redis, prefix: PREFIX, concurrency: 1 });
  mirrorOutcomes(worker, db, "attempts-test");
  await worker.waitUntilReady();
});

afterAll(async () => {
  await worker.close();
  await dispatcher.close();
  await queue.obliterate({ force: true });
  await queue.close();
  redis.disconnect();
  await closeDb();
});

describe("the job context", () => {
  it("gives each run its attempt, and marks only the last allowed as final", async () => {
    const runId = randomUUID();
    await queue.add("try.it", { runId }, { jobId: `try-${runId}`, attempts: JOBS["try.it"].attempts, backoff: { type: "fixed", delay: 50 } });
    const job = await waitFor("the job to complete", async () => {
      const state = await queue.getJobState(`try-${runId}`);
      return state === "completed" ? queue.getJob(`try-${runId}`) : undefined;
    });
    expect(job?.returnvalue).toBe(3);
    expect(seen.get(runId)).toEqual([
      { attempt: 1, isFinalAttempt: false },
      { attempt: 2, isFinalAttempt: false },
      { attempt: 3, isFinalAttempt: true },
    ]);
  });

  it("makes a job allowed one attempt final on its first run", async () => {
    const runId = randomUUID();
    await queue.add("try.it", { runId }, { jobId: `try-${runId}`, attempts: 1 });
    await waitFor("the job to complete", async () => ((await queue.getJobState(`try-${runId}`)) === "completed" ? true : undefined));
    expect(seen.get(runId)).toEqual([{ attempt: 1, isFinalAttempt: true }]);
  });
});
