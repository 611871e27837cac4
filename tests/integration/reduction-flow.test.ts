// A reduction run as a stepped flow (lib/reduction-flow) across our own worker
// processes (production entry point, own queue prefix, a short reduce lock), with
// the real Redis, PostgreSQL and S3 fake. Each result is checked against the same
// reduction run in this process alone (reduceStoredInOneProcess, the
// single-process runner on the same inputs).
//
// Tolerance: the flow merges slices of frames apart and adds their sums, so the
// master differs from one pass's only by float32 rounding of those sums (a few
// units in the 7th digit; merge-slices.test.ts measures the combine alone).
// Checked here: every pixel within 2e-5 relative, plus 1e-6 of the brightest.
import { randomBytes } from "node:crypto";
import { mkdtemp, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Queue, type Job } from "bullmq";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { frames, reductions } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { closeProducerRedis, createRedis } from "@/lib/queue/connection";
import { closeQueues, jobIdFor } from "@/lib/queue/enqueue";
import { reduceStoredInOneProcess } from "@/lib/reduction-flow/one-process";
import { startReduction } from "@/lib/reductions/reductions";
import { bucketName, listObjectKeys, putObjectBytes, readSmallObject } from "@/lib/storage";
import { buildReductionWorkPrefix } from "@/lib/storage/keys";
import { requireTestDatabase } from "../support/env";
import { startOwnWorker, type OwnProcess } from "../support/processes";
import { waitFor } from "../support/wait";
import { createMember } from "./bracket-upload-helpers";
import { makeSyntheticSet } from "./synthetic-set";

requireTestDatabase();
// Set before any queue exists: this file's uploads and reductions go to our own workers.
const PREFIX = `crownlight-flow-red-${process.pid}`;
const savedPrefix = process.env.QUEUE_PREFIX;
process.env.QUEUE_PREFIX = PREFIX;
// The lock must outlast the flow's longest stretch on one thread (the plan: sky geometry, registration,
// levels), a few seconds for these frames but far more on a loaded two-core machine (a 20 s lock
// expired under load, and the parent lost it). 60 s, as the single-process kill tests use.
const WORKER_ENV = { QUEUE_PREFIX: PREFIX, WORKER_REDUCE_LOCK_MS: "60000", WORKER_REDUCE_STALLED_INTERVAL_MS: "3000" };
const EXPOSURES_S = [1 / 1000, 1 / 500, 1 / 250, 1 / 125, 1 / 60, 1 / 30, 1 / 15];

const db = getDb();
const running: OwnProcess[] = [];
const connection = createRedis(process.env.REDIS_URL!, false);
const queue = new Queue("reduce", { connection, prefix: PREFIX });
let owner: Actor;
let sharedSet: string;
let reference: Float32Array;
let referenceLeftOut: unknown;
let scratch: string;

afterAll(async () => {
  for (const w of running) await w.kill("SIGKILL");
  await queue.obliterate({ force: true }).catch(() => undefined);
  await queue.close();
  connection.disconnect();
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
  if (scratch) await rm(scratch, { recursive: true, force: true });
  process.env.QUEUE_PREFIX = savedPrefix;
});

async function startWorker(name: string): Promise<OwnProcess> {
  const w = await startOwnWorker(name, WORKER_ENV);
  running.push(w);
  return w;
}

async function stopAll(): Promise<void> {
  for (const w of running.splice(0)) await w.kill("SIGKILL");
}

async function makeSet(name: string, seed: number): Promise<{ setId: string; frameIds: string[] }> {
  return makeSyntheticSet(db, owner, name, { width: 720, height: 540, exposuresS: EXPOSURES_S, seed, prefix: `flow-${seed}` });
}

/** The data unit of a master.fits as float32 (BITPIX -32, big-endian). */
function fitsData(buf: Buffer): Float32Array {
  const text = buf.toString("latin1");
  const start = Math.ceil((text.search(/END {77}/) + 80) / 2880) * 2880;
  const bitpix = Number(/BITPIX\s*=\s*(-?\d+)/.exec(text)![1]);
  expect(bitpix).toBe(-32);
  const axes = [...text.slice(0, start).matchAll(/NAXIS(\d)\s*=\s*(\d+)/g)].map((m) => Number(m[2]));
  const count = axes.reduce((a, b) => a * b, 1);
  const out = new Float32Array(count);
  for (let i = 0; i < count; i++) out[i] = buf.readFloatBE(start + 4 * i);
  return out;
}

async function storedMaster(reductionId: string): Promise<Float32Array> {
  const [r] = await db.select().from(reductions).where(eq(reductions.id, reductionId));
  return fitsData(await readSmallObject({ bucket: bucketName("derived"), key: r.outputs!.master }, 64 * 1024 ** 2));
}

async function storedReport(reductionId: string): Promise<{ frames: { name: string }[]; framesLeftOut: unknown } & Record<string, unknown>> {
  const [r] = await db.select().from(reductions).where(eq(reductions.id, reductionId));
  return JSON.parse((await readSmallObject({ bucket: bucketName("derived"), key: r.outputs!.report })).toString("utf8"));
}

function expectSameMaster(master: Float32Array, label: string): void {
  expect(master.length, label).toBe(reference.length);
  let peak = 0;
  for (const v of reference) peak = Math.max(peak, Math.abs(v));
  let worst = 0;
  let worstAt = -1;
  for (let i = 0; i < master.length; i++) {
    const excess = Math.abs(master[i] - reference[i]) - (2e-5 * Math.abs(reference[i]) + 1e-6 * peak);
    if (excess > worst) {
      worst = excess;
      worstAt = i;
    }
  }
  expect(worstAt, `${label}: pixel ${worstAt} is ${master[worstAt]} in the flow and ${reference[worstAt]} in one process`).toBe(-1);
}

async function finished(reductionId: string): Promise<void> {
  const logs = async () => (await Promise.all(running.map((w) => w.readLog()))).join("\n").split("\n").slice(-60).join("\n");
  try {
    await waitFor("the reduction to end", async () => {
      const [r] = await db.select().from(reductions).where(eq(reductions.id, reductionId));
      if (r.state === "failed") throw new Error(`the reduction failed: ${r.error}`);
      return r.state === "done" ? true : undefined;
    }, 300_000, 250);
  } catch (err) {
    const [r] = await db.select().from(reductions).where(eq(reductions.id, reductionId));
    throw new Error(`${(err as Error).message}; the reduction is ${r.state} at ${r.stage} (${r.error ?? "no error"})\n${await logs()}`);
  }
}

/** Every part job of a reduction's flow, whatever its state. */
async function partsOf(reductionId: string): Promise<Job[]> {
  const parentId = jobIdFor("reduction.run", { reductionId });
  const jobs = await queue.getJobs(["completed", "active", "waiting", "delayed", "failed", "prioritized"], 0, -1);
  return jobs.filter((j) => j.id?.startsWith(`${parentId}__`));
}

const stepOf = (job: Job) => job.id!.split("__").at(-2)!;

describe("a reduction shared by worker processes", () => {
  beforeAll(async () => {
    owner = await createMember(db, "Fenna Flowtest");
    const ingester = await startWorker("flow-ingest");
    ({ setId: sharedSet } = await makeSet("Shared by two workers", 61));
    await ingester.kill("SIGKILL");
    running.length = 0;
    // The reference: one reduction of the set, reduced in this process alone (no worker runs yet).
    const first = await startReduction(db, owner, sharedSet, { registration: "sun", filter: "mgn" });
    scratch = await mkdtemp(join(tmpdir(), "crownlight-flow-ref-"));
    const one = await reduceStoredInOneProcess(db, first.id, scratch);
    reference = fitsData(await readFile(join(one.outDir, "master.fits")));
    referenceLeftOut = one.report.framesLeftOut;
    await queue.obliterate({ force: true });
  }, 300_000);

  it("gives the single-process master when two workers share its parts, and leaves no pieces behind", async () => {
    const a = await startWorker("flow-a");
    const b = await startWorker("flow-b");
    const started = await startReduction(db, owner, sharedSet, { registration: "sun", filter: "mgn" });
    await finished(started.id);
    expectSameMaster(await storedMaster(started.id), "two workers");
    const report = await storedReport(started.id);
    expect(report.frames.map((f) => f.name)).toHaveLength(EXPOSURES_S.length);
    expect(report.framesLeftOut).toEqual(referenceLeftOut);
    // Both processes took parts; each step's parts ran once.
    const parts = await partsOf(started.id);
    const steps = new Map<string, number>();
    for (const p of parts) steps.set(stepOf(p), (steps.get(stepOf(p)) ?? 0) + 1);
    expect(Object.fromEntries(steps)).toEqual({ decode: 7, limbs: 7, "merge-pilot": 3, merge: 3 });
    const takers = new Set(parts.map((p) => p.processedBy?.split(":").at(-1)));
    expect(takers).toEqual(new Set([String(a.pid), String(b.pid)]));
    expect(parts.every((p) => p.attemptsStarted === 1)).toBe(true);
    // The pieces the parts handed each other are gone. The last step deletes them after it marks
    // the reduction done: wait for the parent job itself to complete first.
    const parent = (await queue.getJob(jobIdFor("reduction.run", { reductionId: started.id })))!;
    await waitFor("the parent job to complete", async () => ((await parent.getState()) === "completed" ? true : undefined), 60_000, 100);
    expect(await listObjectKeys({ bucket: bucketName("derived"), prefix: buildReductionWorkPrefix(started.id) })).toEqual([]);
    await stopAll();
  }, 400_000);

  it("retries a part whose worker was killed with SIGKILL, and the master is unchanged", async () => {
    const first = await startWorker("flow-kill-part-first");
    const started = await startReduction(db, owner, sharedSet, { registration: "sun", filter: "mgn" });
    const parentId = jobIdFor("reduction.run", { reductionId: started.id });
    const victim = await waitFor("a merge part to be running", async () => {
      const active = await queue.getActive();
      return active.find((j) => j.id?.startsWith(`${parentId}__`) && stepOf(j) === "merge-pilot")?.id ?? undefined;
    }, 240_000, 10);
    await first.kill("SIGKILL");
    await startWorker("flow-kill-part-second");
    await finished(started.id);
    expectSameMaster(await storedMaster(started.id), "after a part was killed");
    const killed = (await queue.getJob(victim))!;
    expect(await killed.getState()).toBe("completed");
    expect(killed.attemptsStarted).toBeGreaterThanOrEqual(2);
    // Counted once: the step still has its three parts, and the report its seven frames.
    expect((await partsOf(started.id)).filter((p) => stepOf(p) === "merge-pilot")).toHaveLength(3);
    expect((await storedReport(started.id)).frames).toHaveLength(EXPOSURES_S.length);
    await stopAll();
  }, 400_000);

  it("resumes a parent killed after its parts finished, without running them again", async () => {
    const first = await startWorker("flow-kill-parent-first");
    const started = await startReduction(db, owner, sharedSet, { registration: "sun", filter: "mgn" });
    const parentId = jobIdFor("reduction.run", { reductionId: started.id });
    // The finish runs in the parent once every merge part is done.
    await waitFor("the parent to be finishing", async () => {
      const [r] = await db.select({ stage: reductions.stage }).from(reductions).where(eq(reductions.id, started.id));
      const finishing = ["renditions", "write-master", "write-renditions", "tiles", "summary", "store"].includes(r.stage ?? "");
      return finishing && (await queue.getActive()).some((j) => j.id === parentId) ? true : undefined;
    }, 240_000, 10);
    await first.kill("SIGKILL");
    const partsBefore = (await partsOf(started.id)).map((p) => `${p.id}:${p.attemptsStarted}`).sort();
    await startWorker("flow-kill-parent-second");
    await finished(started.id);
    expectSameMaster(await storedMaster(started.id), "after the parent was killed");
    const parent = (await queue.getJob(parentId))!;
    expect(parent.stalledCounter).toBe(1);
    // No part ran again: the same jobs, each started once.
    const partsAfter = (await partsOf(started.id)).map((p) => `${p.id}:${p.attemptsStarted}`).sort();
    expect(partsAfter).toEqual(partsBefore);
    expect(partsAfter.every((p) => p.endsWith(":1"))).toBe(true);
    await stopAll();
  }, 400_000);

  it("leaves out a frame whose stored file cannot be decoded, naming it, and reduces the rest", async () => {
    const worker = await startWorker("flow-corrupt");
    const { setId, frameIds } = await makeSet("One file spoilt in storage", 62);
    // The third frame's original is overwritten after ingest (storage fault), so only the reduction meets it.
    const [spoilt] = await db.select().from(frames).where(eq(frames.id, frameIds[2]));
    await putObjectBytes({ bucket: bucketName("originals"), key: spoilt.originalKey }, Buffer.concat([Buffer.from("SIMPLE  =                    T"), randomBytes(4000)]), "application/fits");
    const started = await startReduction(db, owner, setId, { registration: "sun", filter: "mgn" });
    await finished(started.id);
    const report = await storedReport(started.id);
    expect(report.frames.map((f) => f.name)).not.toContain(spoilt.originalFileName);
    expect(report.frames).toHaveLength(EXPOSURES_S.length - 1);
    const leftOut = report.framesLeftOut as { name: string; reason: string }[];
    expect(leftOut.map((l) => l.name)).toEqual([spoilt.originalFileName]);
    expect(leftOut[0].reason).toMatch(/could not be decoded/);
    expect(worker.isRunning()).toBe(true);
    await stopAll();
  }, 400_000);
});
