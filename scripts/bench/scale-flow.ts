// One reduction of a bench set through the app's stepped flow (lib/reduction-flow):
// N worker processes of our own (node --import tsx worker/index.ts, the production
// entry point) on the bench's queue prefix, all watched through /proc with every
// process below them; the reduction started as the start form starts it
// (startReduction: the parent job reduction.run, whose parts any of the workers
// takes); timed from that call until the row says done. Afterwards the workers are
// stopped (SIGTERM, they finish what runs), and the reduction is removed with its
// outputs, so the bench leaves only its sets behind.
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { rm } from "node:fs/promises";
import { availableParallelism } from "node:os";
import { dirname } from "node:path";
import { Queue } from "bullmq";
import { eq, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { jobRuns, outboxMessages, reductions } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { getProducerRedis } from "@/lib/queue/connection";
import { parseStepTimes } from "@/lib/queue/stepped-flow";
import { QUEUES } from "@/lib/queue/jobs";
import { startReduction } from "@/lib/reductions/reductions";
import { bucketName, buildReductionPrefix, deleteObjectsUnder, readSmallObject } from "@/lib/storage";
import { buildReductionWorkPrefix } from "@/lib/storage/keys";
import { startOwnWorker, type OwnProcess } from "../../tests/support/processes";
import { readClockTicksPerS, watchProcessTrees, type WatchedProcess } from "./process-monitor";
import { parseProcStat, parseProcStatus } from "./proc-stats";

/** The bench's own queue prefix: the development worker, if one runs, never takes these jobs. */
export const BENCH_QUEUE_PREFIX = "crownlight-bench-scale";
const POLL_MS = 250;

export interface FlowWorker {
  pid: number;
  /** Resident memory when the reduction started (the idle worker), bytes. */
  idleRssBytes: number;
  /** Largest VmHWM or VmRSS sampled, bytes (the kernel's high-water mark covers the whole life of the process). */
  peakRssBytes: number;
  /** CPU from the reduction's start to its end, seconds. */
  cpuS: number;
}

export interface FlowRunMeasured {
  measured: true;
  workers: number;
  /** From startReduction to the row saying done, ms. */
  wallMs: number;
  perWorker: FlowWorker[];
  /** Processes below the workers, if any (none expected: sharp and the decoders use threads). */
  below: WatchedProcess[];
  /** Largest sum of resident memory of all watched processes at one sample, bytes. */
  peakTotalBytes: number;
  cpuS: number;
  framesLeftOut: number;
  /** Each step of the flow in order, from the workers' step-time lines. */
  steps: FlowStepTime[];
}

/** One step of the flow as the workers ran it. */
export interface FlowStepTime {
  step: string;
  /** The parent's own work ("run"), or how many parts. */
  parts: number;
  /** From the first start to the last end of the step's work, ms. */
  spanMs: number;
  /** The work's durations added up, ms (above spanMs when parts ran side by side). */
  busyMs: number;
  /** Busy ms of each worker process, in the order of perWorker. */
  busyByWorkerMs: number[];
}

/** The workers' logs once one of them has the step's line for this reduction (at most 15 s later; else as they are). */
async function waitForStepLine(readLogs: () => Promise<string[]>, parentIdPart: string, step: string): Promise<string[]> {
  const until = performance.now() + 15_000;
  for (;;) {
    const logs = await readLogs();
    if (logs.some((log) => parseStepTimes(log).some((t) => t.parentId.includes(parentIdPart) && t.step === step)) || performance.now() > until) return logs;
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** The step table of one reduction from its workers' logs (lines written by lib/queue/stepped-flow.ts). */
export function summarizeStepTimes(logs: string[], pids: number[], parentIdPart: string): FlowStepTime[] {
  const times = logs.flatMap((log) => parseStepTimes(log)).filter((t) => t.parentId.includes(parentIdPart));
  const order: string[] = [];
  for (const t of [...times].sort((a, b) => a.startMs - b.startMs)) if (!order.includes(t.step)) order.push(t.step);
  return order.map((step) => {
    const of = times.filter((t) => t.step === step);
    const parts = of.filter((t) => t.what !== "run").length;
    return {
      step,
      parts,
      spanMs: Math.max(...of.map((t) => t.endMs)) - Math.min(...of.map((t) => t.startMs)),
      busyMs: of.reduce((s, t) => s + t.endMs - t.startMs, 0),
      busyByWorkerMs: pids.map((pid) => of.filter((t) => t.pid === pid).reduce((s, t) => s + t.endMs - t.startMs, 0)),
    };
  });
}

export interface FlowRunFailed {
  measured: false;
  workers: number;
  reason: string;
}

export type FlowRun = FlowRunMeasured | FlowRunFailed;

/** Removes every key of the bench's queues (left by a run cut short, or this run's finished jobs). Only while no bench worker runs. */
export async function clearBenchQueues(): Promise<void> {
  for (const name of QUEUES) {
    const queue = new Queue(name, { connection: getProducerRedis(), prefix: BENCH_QUEUE_PREFIX });
    await queue.obliterate({ force: true });
    await queue.close();
  }
}

/** Starts `count` worker processes on the bench's prefix, runs `work`, and stops them however it ends. */
export async function withBenchWorkers<T>(count: number, work: (workers: OwnProcess[]) => Promise<T>, oneCoreEach = false): Promise<T> {
  const workers: OwnProcess[] = [];
  try {
    for (let i = 0; i < count; i++) {
      const w = await startOwnWorker(`bench-worker-${i + 1}`, { QUEUE_PREFIX: BENCH_QUEUE_PREFIX });
      workers.push(w);
      // Every thread of the process (threads started later inherit it) on core i alone: a machine of one core.
      if (oneCoreEach) execFileSync("/usr/bin/taskset", ["-a", "-p", "-c", String(i % availableParallelism()), String(w.pid)], { stdio: "ignore" });
    }
    return await work(workers);
  } finally {
    await Promise.all(workers.map((w) => w.kill("SIGTERM")));
    // Their logs' folders (a failure's reason already quotes the logs' last lines).
    await Promise.all(workers.map((w) => rm(dirname(w.logPath), { recursive: true, force: true })));
  }
}

function readOwn(pid: number): { cpuS: number; rssBytes: number } {
  const stat = parseProcStat(readFileSync(`/proc/${pid}/stat`, "utf8"));
  const status = parseProcStatus(readFileSync(`/proc/${pid}/status`, "utf8"));
  if (!stat || !status) throw new Error(`/proc/${pid} could not be read`);
  return { cpuS: (stat.utimeTicks + stat.stimeTicks) / readClockTicksPerS(), rssBytes: status.rssBytes };
}

async function logTail(workers: OwnProcess[]): Promise<string> {
  const logs = await Promise.all(workers.map(async (w, i) => `worker ${i + 1}:\n${(await w.readLog()).trim().split("\n").slice(-12).join("\n")}`));
  return logs.join("\n");
}

/** The reduction, its outputs and its job records go, so that runs do not pile up in the development database and S3. */
async function removeReduction(db: Db, reductionId: string, setId: string): Promise<void> {
  await deleteObjectsUnder({ bucket: bucketName("derived"), prefix: buildReductionPrefix(setId, reductionId) });
  await deleteObjectsUnder({ bucket: bucketName("derived"), prefix: buildReductionWorkPrefix(reductionId) });
  await db.delete(jobRuns).where(sql`${jobRuns.payload}->>'reductionId' = ${reductionId}`);
  // The outcome mail to the bench member (lib/reductions notifyReductionOutcome's outbox id).
  await db.delete(jobRuns).where(sql`${jobRuns.payload}->>'outboxId' = ${`reduction-outcome-${reductionId}`}`);
  await db.delete(outboxMessages).where(eq(outboxMessages.id, `reduction-outcome-${reductionId}`));
  await db.delete(reductions).where(eq(reductions.id, reductionId));
}

async function countFramesLeftOut(outputs: Record<string, string> | null): Promise<number> {
  if (!outputs?.report) return NaN;
  const report = JSON.parse((await readSmallObject({ bucket: bucketName("derived"), key: outputs.report })).toString("utf8")) as { framesLeftOut?: unknown[] };
  return report.framesLeftOut?.length ?? NaN;
}

/**
 * The bench set reduced by `workers` worker processes through the flow. A run that
 * fails (the reduction, a worker, the time limit) comes back unmeasured with why.
 */
export async function measureFlowReduction(db: Db, actor: Actor, setId: string, frames: number, workers: number, log: (line: string) => void, oneCoreEach = false): Promise<FlowRun> {
  const timeoutMs = 10 * 60_000 + frames * 30_000;
  await clearBenchQueues();
  let reductionId: string | undefined;
  try {
    return await withBenchWorkers(workers, async (procs) => {
      const pids = procs.map((p) => p.pid);
      const atStart = pids.map(readOwn);
      const watcher = watchProcessTrees(pids);
      const started = performance.now();
      try {
        const reduction = await startReduction(db, actor, setId, { registration: "corona", filter: "mgn" });
        reductionId = reduction.id;
        let lastLine = "";
        for (;;) {
          const [row] = await db.select({ state: reductions.state, stage: reductions.stage, done: reductions.stageFramesDone, total: reductions.stageFramesTotal, error: reductions.error, outputs: reductions.outputs }).from(reductions).where(eq(reductions.id, reduction.id)).limit(1);
          if (row.state === "done") {
            const wallMs = performance.now() - started;
            const summary = watcher.stop();
            const perWorker = pids.map((pid, i) => {
              const seen = summary.processes.find((p) => p.pid === pid);
              return { pid, idleRssBytes: atStart[i].rssBytes, peakRssBytes: seen?.peakRssBytes ?? NaN, cpuS: (seen?.cpuS ?? NaN) - atStart[i].cpuS };
            });
            const below = summary.processes.filter((p) => !pids.includes(p.pid));
            const cpuS = perWorker.reduce((s, w) => s + w.cpuS, 0) + below.reduce((s, p) => s + p.cpuS, 0);
            // The row says done while the last step's line is being written: wait for it a little.
            const readLogs = () => Promise.all(procs.map((p) => p.readLog()));
            const logs = await waitForStepLine(readLogs, reduction.id, "finish");
            const steps = summarizeStepTimes(logs, pids, reduction.id);
            return { measured: true, workers, wallMs, perWorker, below, peakTotalBytes: summary.peakTotalRssBytes, cpuS, framesLeftOut: await countFramesLeftOut(row.outputs), steps } satisfies FlowRunMeasured;
          }
          if (row.state === "failed") throw new Error(`the reduction failed: ${row.error ?? "no reason recorded"}`);
          const dead = procs.findIndex((p) => !p.isRunning());
          if (dead >= 0) throw new Error(`worker ${dead + 1} exited during the reduction:\n${await logTail(procs)}`);
          if (performance.now() - started > timeoutMs) throw new Error(`not done after ${(timeoutMs / 60_000).toFixed(0)} min (at stage ${row.stage ?? "none"})`);
          const line = `${frames} frames, ${workers} worker process${workers > 1 ? "es" : ""}: ${row.state}, ${row.stage ?? "waiting"}${row.total ? ` ${row.done} of ${row.total}` : ""}`;
          if (line !== lastLine) log(line);
          lastLine = line;
          await new Promise((r) => setTimeout(r, POLL_MS));
        }
      } catch (error) {
        watcher.stop();
        return { measured: false, workers, reason: error instanceof Error ? error.message : String(error) } satisfies FlowRunFailed;
      }
    }, oneCoreEach);
  } catch (error) {
    // The workers did not start, or stopping them failed.
    return { measured: false, workers, reason: error instanceof Error ? error.message : String(error) };
  } finally {
    // With the workers stopped: nothing writes the reduction's pieces any more.
    const id = reductionId;
    if (id) await removeReduction(db, id, setId).catch((e: unknown) => log(`could not remove reduction ${id}: ${String(e)}`));
    await clearBenchQueues().catch(() => undefined);
  }
}
