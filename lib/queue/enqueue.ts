// Typed enqueue: the payload is checked against the registry, the job id is
// deterministic (same work, same id: BullMQ keeps one), and a job_runs row
// mirrors the job in PostgreSQL before it reaches Redis, so pages read state
// from the database.
import { getEnv } from "@/lib/env";
import { Queue } from "bullmq";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { jobRuns } from "@/db/schema";
import { getProducerRedis } from "./connection";
import { JOBS, type JobName, type JobPayload, type QueueName } from "./jobs";

const queues = new Map<QueueName, Queue>();

export function getQueue(name: QueueName): Queue {
  let q = queues.get(name);
  if (!q) {
    q = new Queue(name, { connection: getProducerRedis(), prefix: getEnv().QUEUE_PREFIX });
    queues.set(name, q);
  }
  return q;
}

export async function closeQueues(): Promise<void> {
  await Promise.all([...queues.values()].map((q) => q.close()));
  queues.clear();
}

/** A job id from the job name and the ids it works on; BullMQ ids may not contain ':'. */
export function jobIdFor(name: JobName, payload: Record<string, unknown>): string {
  const parts = Object.keys(payload)
    .sort()
    .map((k) => `${k}=${String(payload[k])}`);
  return `${name}__${parts.join("__")}`.replace(/:/g, "_");
}

export async function enqueue<N extends JobName>(db: DbOrTx, name: N, payload: JobPayload<N>): Promise<string> {
  const def = JOBS[name];
  const data = def.payload.parse(payload) as Record<string, unknown>;
  const id = jobIdFor(name, data);
  await db
    .insert(jobRuns)
    .values({ id, name, payload: data, state: "queued" })
    .onConflictDoUpdate({
      target: jobRuns.id,
      set: { state: "queued", error: null, progress: 0, stage: null, updatedAt: sql`now()` },
    });
  await getQueue(def.queue).add(name, data, {
    jobId: id,
    attempts: def.attempts,
    backoff: { type: "exponential", delay: 2000 },
    removeOnComplete: { age: 24 * 3600, count: 1000 },
    removeOnFail: { age: 7 * 24 * 3600 },
  });
  return id;
}
