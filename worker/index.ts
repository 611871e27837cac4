// The worker process: one BullMQ Worker per queue, each dispatching by job
// name to the typed handlers (worker/dispatch.ts: payloads validated again, state
// mirrored to PostgreSQL), and SIGTERM/SIGINT let running jobs finish before the
// process exits.
import { hostname } from "node:os";
import { Queue, Worker } from "bullmq";
import { closeDb, getDb } from "@/db/client";
import { closeExportExifTool } from "@/lib/editions/export/embed";
import { requireEnvOrExit } from "@/lib/env";
import { createRedis } from "@/lib/queue/connection";
import { JOBS, QUEUES, SCHEDULED_JOBS } from "@/lib/queue/jobs";
import { failReductionGivenUp } from "@/lib/reductions/run";
import { createDispatcher, mirrorOutcomes } from "./dispatch";
import { HANDLERS } from "./registry";

const env = requireEnvOrExit("worker");
const db = getDb();
const connection = createRedis(env.REDIS_URL, true);
const prefix = env.QUEUE_PREFIX;
const dispatcher = createDispatcher({ db, connection, prefix, jobs: JOBS, handlers: HANDLERS });

// A reduction's numeric stages hold the event loop for seconds at a time; a
// long lock keeps BullMQ from handing the job to another worker meanwhile. The
// price: a reduction whose worker was killed is taken again only after the lock
// expires and two stalled checks pass (10 to 20 min by default). Tests of that
// recovery shorten both; the lock must stay longer than any stage of a real bracket.
const reduceLockMs = env.WORKER_REDUCE_LOCK_MS;
const reduceStalledMs = env.WORKER_REDUCE_STALLED_INTERVAL_MS;

const workers = QUEUES.map((queue) => {
  const w = new Worker(queue, dispatcher.process, {
    connection,
    prefix,
    concurrency: queue === "mail" ? 4 : 1,
    // Recorded on each job it takes (processedBy): shows which process did which part of a flow.
    name: `${hostname()}:${process.pid}`,
    ...(queue === "reduce" ? { lockDuration: reduceLockMs, stalledInterval: reduceStalledMs } : {}),
  });
  mirrorOutcomes(w, db, "worker");
  // A reduction's parent that BullMQ fails without running it (stalled too often) still ends its reduction.
  w.on("failed", (job, err) => {
    if (job?.name !== "reduction.run") return;
    void failReductionGivenUp(db, job, err).catch((e) => console.error("[worker] reduction failure not recorded", e));
  });
  return w;
});

// Scheduled runs (SCHEDULED_JOBS) take their attempts from JOBS, with enqueue's backoff: a run caught
// by a moment without Redis is tried again, not left failed until the next one. A run that completes
// is removed at once (a run a minute would otherwise pile up in Redis for good); `true` removes that
// run alone, where a count would trim the queue's other completed jobs too. Failed runs are kept as
// enqueue keeps them. upsertJobScheduler keeps one schedule however many workers start.
const schedulers = new Map<string, Queue>();
for (const { name, schedulerId, everyMs } of SCHEDULED_JOBS) {
  const queueName = JOBS[name].queue;
  const scheduler = schedulers.get(queueName) ?? new Queue(queueName, { connection, prefix });
  schedulers.set(queueName, scheduler);
  await scheduler.upsertJobScheduler(
    schedulerId,
    { every: everyMs },
    { name, data: {}, opts: { attempts: JOBS[name].attempts, backoff: { type: "exponential", delay: 2000 }, removeOnComplete: true, removeOnFail: { age: 7 * 24 * 3600 } } },
  );
}

// scripts/with-malloc-tuning.sh sets this; without it a large reduction holds a few hundred MB more.
if (process.platform === "linux" && !process.env.MALLOC_MMAP_THRESHOLD_) {
  console.warn("[worker] MALLOC_MMAP_THRESHOLD_ is not set: start the worker through scripts/with-malloc-tuning.sh (npm run worker does), or reductions will hold more memory than they need");
}
console.log(`[worker] listening on queues: ${QUEUES.join(", ")}`);

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`[worker] ${signal}: finishing running jobs`);
  // Each queue's running jobs finish however the others' closing goes (Redis or PostgreSQL may be
  // gone by now); a step that fails is logged and the rest still run.
  const steps = [
    await Promise.allSettled(workers.map((w) => w.close())),
    await Promise.allSettled([dispatcher.close(), ...[...schedulers.values()].map((q) => q.close()), closeExportExifTool()]),
  ];
  connection.disconnect();
  steps.push(await Promise.allSettled([closeDb()]));
  const failures = steps.flat().filter((r): r is PromiseRejectedResult => r.status === "rejected");
  for (const f of failures) console.error("[worker] while stopping:", f.reason);
  process.exit(failures.length ? 1 : 0);
}
process.on("SIGTERM", () => void shutdown("SIGTERM"));
process.on("SIGINT", () => void shutdown("SIGINT"));
