// Fault: the worker is killed (SIGKILL) in the middle of a reduction and another
// is started. BullMQ's stalled-job check hands the job it held (a part of the
// reduction's flow, or its parent) to the new worker once the dead one's lock
// expires; the reduction must then end done exactly once, with one set of outputs
// under its prefix and nothing left from the killed run. (reduction-flow.test.ts
// kills a part and the parent at chosen points and checks the master itself.)
// The workers here are our own (production entry point, own queue prefix, a
// short reduce lock through WORKER_REDUCE_LOCK_MS), so the suite's shared
// worker never sees these jobs.
import { ListObjectsV2Command } from "@aws-sdk/client-s3";
import { Queue } from "bullmq";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { jobRuns, reductions } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { closeProducerRedis, createRedis } from "@/lib/queue/connection";
import { closeQueues, jobIdFor } from "@/lib/queue/enqueue";
import { startReduction } from "@/lib/reductions/reductions";
import { bucketName, buildDerivedPrefix, getS3, listObjectKeys, readObjectRange, buildReductionPrefix } from "@/lib/storage";
import { buildReductionWorkPrefix } from "@/lib/storage/keys";
import { requireTestDatabase } from "../support/env";
import { startOwnWorker, type OwnProcess } from "../support/processes";
import { waitFor } from "../support/wait";
import { createMember } from "./bracket-upload-helpers";
import { makeSyntheticSet } from "./synthetic-set";

requireTestDatabase();
// Set before any queue exists: this file's uploads and reductions go to our own workers.
const PREFIX = `crownlight-faults-kill-${process.pid}`;
const savedPrefix = process.env.QUEUE_PREFIX;
process.env.QUEUE_PREFIX = PREFIX;
// The reduce lock must outlast the longest stretch the reduction holds the worker's thread (the
// pipeline's numeric core runs in one piece: registration twice, the levels, two merge passes and
// the renditions; over 15 s on a loaded two-core machine since the reduction handles real cameras'
// brackets). 60 s leaves room; the kill tests then wait that long for the stalled check.
const WORKER_ENV = { QUEUE_PREFIX: PREFIX, WORKER_REDUCE_LOCK_MS: "60000", WORKER_REDUCE_STALLED_INTERVAL_MS: "4000" };

const db = getDb();
const running: OwnProcess[] = [];
let owner: Actor;

afterAll(async () => {
  for (const w of running) await w.kill("SIGKILL");
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
  process.env.QUEUE_PREFIX = savedPrefix;
});

async function startWorker(name: string): Promise<OwnProcess> {
  const w = await startOwnWorker(name, WORKER_ENV);
  running.push(w);
  return w;
}

async function makeSet(name: string, seed: number): Promise<string> {
  const { setId } = await makeSyntheticSet(db, owner, name, { width: 640, height: 480, exposuresS: [1 / 1000, 1 / 250, 1 / 60, 1 / 15, 1 / 4], seed, prefix: `kill-${seed}` });
  return setId;
}

interface ObjectInfo {
  key: string;
  lastModified: Date;
}

async function listObjects(prefix: string): Promise<ObjectInfo[]> {
  const out: ObjectInfo[] = [];
  let token: string | undefined;
  do {
    const page = await getS3().send(new ListObjectsV2Command({ Bucket: bucketName("derived"), Prefix: prefix, ContinuationToken: token }));
    for (const o of page.Contents ?? []) out.push({ key: o.Key!, lastModified: o.LastModified! });
    token = page.IsTruncated ? page.NextContinuationToken : undefined;
  } while (token);
  return out;
}

/** Tiles a Deep Zoom pyramid must hold: level L of maxLevel = ceil(log2(max(W, H))) is ceil(W / 2^(maxLevel - L)) px wide (REFERENCES.md, DZI). */
function expectedDziTiles(dzi: string, base: string): string[] {
  const tileSize = Number(/TileSize="(\d+)"/.exec(dzi)![1]);
  const format = /Format="(\w+)"/.exec(dzi)![1];
  const width = Number(/Width="(\d+)"/.exec(dzi)![1]);
  const height = Number(/Height="(\d+)"/.exec(dzi)![1]);
  const maxLevel = Math.ceil(Math.log2(Math.max(width, height)));
  const keys: string[] = [];
  for (let level = 0; level <= maxLevel; level++) {
    const w = Math.ceil(width / 2 ** (maxLevel - level));
    const h = Math.ceil(height / 2 ** (maxLevel - level));
    for (let c = 0; c < Math.ceil(w / tileSize); c++) for (let r = 0; r < Math.ceil(h / tileSize); r++) keys.push(`${base}_files/${level}/${c}_${r}.${format}`);
  }
  return keys;
}

/**
 * Kills the first worker once the reduction's row shows `isKillPoint`, starts a
 * second, and checks that the reduction ends done once with a single, complete
 * set of outputs written by the second run.
 */
async function killAndRecover(setId: string, isKillPoint: (r: { stage: string | null; progress: number }) => boolean, label: string) {
  const first = await startWorker(`kill-first-${label}`);
  const started = await startReduction(db, owner, setId, { registration: "sun", filter: "mgn" });
  const jobId = jobIdFor("reduction.run", { reductionId: started.id });

  const atKill = await waitFor(`the reduction to reach ${label}`, async () => {
    const [r] = await db.select().from(reductions).where(eq(reductions.id, started.id));
    if (r.state === "done" || r.state === "failed") throw new Error(`the reduction ended (${r.state}) before the kill point (${label}); last stage ${r.stage}`);
    return r.state === "running" && isKillPoint(r) ? r : undefined;
  }, 180_000, 25);
  await first.kill("SIGKILL");
  const killedAt = Date.now();
  const [afterKill] = await db.select().from(reductions).where(eq(reductions.id, started.id));
  expect(afterKill.state, "the killed run did not finish the reduction").toBe("running");

  const second = await startWorker(`kill-second-${label}`);
  const done = await waitFor("the reduction to end after the restart", async () => {
    const [r] = await db.select().from(reductions).where(eq(reductions.id, started.id));
    if (r.state === "failed") throw new Error(`the reduction failed after the restart: ${r.error}\n${await second.readLog()}`);
    return r.state === "done" ? r : undefined;
  }, 240_000, 500);

  // For the record (not an assertion): where the kill landed and how long the recovery took.
  console.info(`[faults] killed at ${atKill.stage} ${(atKill.progress * 100).toFixed(0)} %; done ${((Date.now() - killedAt) / 1000).toFixed(1)} s after the kill`);
  expect(done.progress).toBe(1);
  expect(done.error).toBeNull();
  expect(done.finishedAt).not.toBeNull();

  // One reduction, one prefix: nothing under the set's reductions but this one's outputs.
  const expectedPrefix = buildReductionPrefix(setId, started.id);
  expect(done.outputs?.prefix).toBe(expectedPrefix);
  expect(await db.select({ id: reductions.id }).from(reductions).where(eq(reductions.bracketSetId, setId))).toHaveLength(1);
  const objects = await listObjects(`${buildDerivedPrefix(setId)}reductions/`);
  expect(objects.filter((o) => !o.key.startsWith(expectedPrefix))).toEqual([]);
  const relative = objects.map((o) => o.key.slice(expectedPrefix.length));
  expect(new Set(relative).size).toBe(relative.length);
  for (const name of ["master.fits", "natural.png", "structure.png", "preview.jpg", "report.json", "tiles/natural.dzi", "tiles/structure.dzi", "tiles/natural-iiif/info.json", "tiles/structure-iiif/info.json"]) {
    expect(relative, name).toContain(name);
  }
  // The Deep Zoom pyramids are complete, tile for tile, with no stray tile from the killed run.
  for (const base of ["natural", "structure"]) {
    const dzi = (await readObjectRange({ bucket: bucketName("derived"), key: `${expectedPrefix}tiles/${base}.dzi` }, 0, 100_000)).toString("utf8");
    const want = expectedDziTiles(dzi, `tiles/${base}`).sort();
    expect(relative.filter((k) => k.startsWith(`tiles/${base}_files/`)).sort()).toEqual(want);
  }
  // Every output was written after the kill, by the run that finished (a parent killed while
  // storing runs its last step again whole): S3 times have whole seconds, so compare from the second of the kill.
  const killSecond = Math.floor(killedAt / 1000) * 1000;
  expect(objects.filter((o) => o.lastModified.getTime() < killSecond).map((o) => o.key)).toEqual([]);
  // The parent job completed, mirrored as done, without a failure.
  // The mirror follows BullMQ's "completed" event, a moment after the handler wrote the reduction row.
  const run = await waitFor("the job's mirror to say done", async () => {
    const [r] = await db.select().from(jobRuns).where(eq(jobRuns.id, jobId));
    return r.state === "running" || r.state === "queued" ? undefined : r;
  }, 60_000);
  expect([run.state, run.progress, run.error]).toEqual(["done", 1, null]);
  const connection = createRedis(process.env.REDIS_URL!, false);
  const queue = new Queue("reduce", { connection, prefix: PREFIX });
  try {
    const job = (await queue.getJob(jobId))!;
    expect(await job.getState()).toBe("completed");
    expect(job.attemptsMade).toBe(1);
    expect(job.failedReason ?? null).toBeNull();
    // The pieces the flow's parts handed each other are gone. The last step deletes them after it
    // marks the reduction done, so this is checked once the job itself has completed.
    expect(await listObjectKeys({ bucket: bucketName("derived"), prefix: buildReductionWorkPrefix(started.id) })).toEqual([]);
  } finally {
    await queue.close();
    connection.disconnect();
  }
  await second.kill("SIGKILL");
  return { atKill, done, objectCount: objects.length };
}

describe("a worker killed in the middle of a reduction", () => {
  let computeSet: string;
  let storeSet: string;

  beforeAll(async () => {
    owner = await createMember(db, "Kai Killtest");
    // The worker that ingests the frames; it goes before the reductions start.
    const ingester = await startWorker("kill-ingest");
    computeSet = await makeSet("Killed while computing", 41);
    storeSet = await makeSet("Killed while storing", 42);
    await ingester.kill("SIGKILL");
  }, 300_000);

  it("is finished exactly once by the next worker when killed while computing", async () => {
    const { atKill, objectCount } = await killAndRecover(computeSet, (r) => r.progress > 0 && r.stage !== null && r.stage !== "fetch" && r.stage !== "store", "computing");
    expect(atKill.stage).not.toBe("store");
    expect(objectCount).toBeGreaterThan(9);
  }, 600_000);

  it("is finished exactly once by the next worker when killed while storing, with no output left from the killed run", async () => {
    const { atKill } = await killAndRecover(storeSet, (r) => r.stage === "store" && r.progress > 0, "storing");
    // Outputs were already being written when the first worker died.
    expect(atKill.stage).toBe("store");
  }, 600_000);
});
