// The worker process: one BullMQ Worker per queue, each dispatching by job
// name to the typed handlers. Payloads are validated again here (a stale or
// forged payload is refused without retry), state is mirrored to PostgreSQL,
// and SIGTERM/SIGINT let running jobs finish before the process exits.
import { Queue, UnrecoverableError, Worker, type Job } from "bullmq";
import { closeDb, getDb } from "@/db/client";
import { closeExportExifTool } from "@/lib/editions/export/embed";
import { requireEnvOrExit } from "@/lib/env";
import { createRedis } from "@/lib/queue/connection";
import { isJobName, JOBS, QUEUES, type JobName } from "@/lib/queue/jobs";
import { mirrorJob } from "./mirror";
import { HANDLERS } from "./registry";

const env = requireEnvOrExit("worker");
const db = getDb();
const connection = createRedis(env.REDIS_URL, true);
const prefix = process.env.QUEUE_PREFIX ?? "crownlight";

async function run(job: Job): Promise<void> {
  const id = job.id ?? "";
  if (!isJobName(job.name)) throw new UnrecoverableError(`unknown job ${job.name}`);
  const name: JobName = job.name;
  const parsed = JOBS[name].payload.safeParse(job.data);
  if (!parsed.success) throw new UnrecoverableError(`bad payload for ${name}: ${parsed.error.issues[0]?.message}`);
  await mirrorJob(db, id, { state: "running", attempts: job.attemptsMade + 1, error: null });
  const report = async (stage: string, fraction: number) => {
    await job.updateProgress(Math.round(fraction * 100));
    await mirrorJob(db, id, { stage, progress: Math.max(0, Math.min(1, fraction)) });
  };
  const isLastAttempt = job.attemptsMade + 1 >= (job.opts.attempts ?? 1);
  await HANDLERS[name]({ db, jobId: id, payload: parsed.data as never, report, isLastAttempt });
}

/** A whole number of milliseconds from env, at least 1 s; a bad value stops the worker naming the variable. */
function readMs(name: string, fallback: number): number {
  const text = process.env[name];
  if (text === undefined || text === "") return fallback;
  const ms = Number(text);
  if (!Number.isInteger(ms) || ms < 1000) {
    console.error(`[worker] ${name} must be a whole number of milliseconds, at least 1000; got "${text}"`);
    process.exit(1);
  }
  return ms;
}

// A reduction's numeric stages hold the event loop for seconds at a time; a
// long lock keeps BullMQ from handing the job to another worker meanwhile. The
// price: a reduction whose worker was killed is taken again only after the lock
// expires and two stalled checks pass (10 to 20 min by default). Tests of that
// recovery shorten both; the lock must stay longer than any stage of a real bracket.
const reduceLockMs = readMs("WORKER_REDUCE_LOCK_MS", 10 * 60_000);
const reduceStalledMs = readMs("WORKER_REDUCE_STALLED_INTERVAL_MS", 5 * 60_000);

const workers = QUEUES.map((queue) => {
  const w = new Worker(queue, run, {
    connection,
    prefix,
    concurrency: queue === "mail" ? 4 : 1,
    ...(queue === "reduce" ? { lockDuration: reduceLockMs, stalledInterval: reduceStalledMs } : {}),
  });
  w.on("completed", (job) => {
    void mirrorJob(db, job.id ?? "", { state: "done", progress: 1 }).catch((e) => console.error("mirror", e));
  });
  w.on("failed", (job, err) => {
    if (!job) return;
    const final = err instanceof UnrecoverableError || job.attemptsMade >= (job.opts.attempts ?? 1);
    console.error(`[worker] ${job.name} ${job.id} ${final ? "failed" : "will retry"}: ${err.message}`);
    void mirrorJob(db, job.id ?? "", { state: final ? "failed" : "queued", error: err.message, attempts: job.attemptsMade }).catch(
      (e) => console.error("mirror", e),
    );
  });
  w.on("error", (err) => console.error(`[worker] ${queue} queue error:`, err.message));
  return w;
});

// The sweep runs every hour; upsertJobScheduler keeps one schedule however many workers start.
const sweeper = new Queue("media", { connection, prefix });
await sweeper.upsertJobScheduler("uploads-sweep-hourly", { every: 3600_000 }, { name: "uploads.sweep", data: {} });
// Mail whose job never reached Redis (an enqueue that failed after its commit) is queued again every 5 minutes.
const mailScheduler = new Queue("mail", { connection, prefix });
await mailScheduler.upsertJobScheduler("outbox-resend-5min", { every: 5 * 60_000 }, { name: "outbox.resend", data: {} });

console.log(`[worker] listening on queues: ${QUEUES.join(", ")}`);

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`[worker] ${signal}: finishing running jobs`);
  await Promise.all(workers.map((w) => w.close()));
  await sweeper.close();
  await mailScheduler.close();
  await closeExportExifTool();
  connection.disconnect();
  await closeDb();
  process.exit(0);
}
process.on("SIGTERM", () => void shutdown("SIGTERM"));
process.on("SIGINT", () => void shutdown("SIGINT"));
