// Stepped flows (lib/queue/stepped-flow.ts) across separate worker processes,
// with the real Redis: a toy flow whose answer is known exactly
// (tests/support/toy-flow.ts) runs on our own worker processes (the production
// dispatcher on a toy queue, own queue prefix, 5 s lock), which the tests kill
// with SIGKILL at chosen points. Every execution of a part or step is logged in
// Redis, so the tests count what was done again and what was not.
import { randomUUID } from "node:crypto";
import { Queue } from "bullmq";
import { eq, inArray } from "drizzle-orm";
import type { Redis } from "ioredis";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { jobRuns } from "@/db/schema";
import { createRedis } from "@/lib/queue/connection";
import { parseStepTimes, partIdPrefix, type FlowValue } from "@/lib/queue/stepped-flow";
import { requireTestDatabase } from "../support/env";
import { startOwnScript, type OwnProcess } from "../support/processes";
import { TOY_QUEUE, toyKeys, type ToyConfig } from "../support/toy-flow";
import { waitFor } from "../support/wait";

requireTestDatabase();
const PREFIX = `crownlight-flow-${process.pid}`;
const savedPrefix = process.env.QUEUE_PREFIX;
const db = getDb();
let redis: Redis;
let queue: Queue;
const running: OwnProcess[] = [];
const runIds: string[] = [];

beforeAll(() => {
  // The toy's keys carry the queue prefix; this process reads them with the same one.
  process.env.QUEUE_PREFIX = PREFIX;
  redis = createRedis(process.env.REDIS_URL!, false);
  queue = new Queue(TOY_QUEUE, { connection: redis, prefix: PREFIX });
});

afterEach(async () => {
  for (const p of running.splice(0)) await p.kill("SIGKILL");
  await queue.obliterate({ force: true });
  for (const runId of runIds.splice(0)) {
    const keys = toyKeys(runId);
    await redis.del(...keys.all, keys.stopped("part:squares:3"), keys.stopped("step:squares"), keys.stopped("step:combine"));
    await db.delete(jobRuns).where(eq(jobRuns.id, parentJobId(runId)));
  }
});

afterAll(async () => {
  await queue.close();
  redis.disconnect();
  await closeDb();
  process.env.QUEUE_PREFIX = savedPrefix;
});

const parentJobId = (runId: string) => `toy.run__runId=${runId}`;

async function startToyWorker(name: string): Promise<OwnProcess> {
  const p = await startOwnScript(name, "tests/support/toy-flow-worker.ts", { QUEUE_PREFIX: PREFIX }, "[toy-worker] listening");
  running.push(p);
  return p;
}

/** Queues a toy flow the way enqueue() does: a job_runs row first, then the job with its deterministic id. */
async function startToyRun(config: ToyConfig): Promise<{ runId: string; jobId: string }> {
  const runId = `run-${randomUUID().slice(0, 8)}`;
  runIds.push(runId);
  await redis.set(toyKeys(runId).config, JSON.stringify(config));
  const jobId = parentJobId(runId);
  await db.insert(jobRuns).values({ id: jobId, name: "toy.run", payload: { runId }, state: "queued" });
  await queue.add("toy.run", { runId }, { jobId, attempts: 2 });
  return { runId, jobId };
}

async function finished(jobId: string): Promise<Record<string, FlowValue>> {
  return waitFor("the toy flow to finish", async () => {
    // The state first, then the job: BullMQ stores the return value and moves the job to completed in
    // one step, so a job read after its state says completed has its value. (Read the other way round,
    // a job that finished between the two reads came back completed with no value.)
    const state = await queue.getJobState(jobId);
    if (state !== "completed" && state !== "failed") return undefined;
    const job = (await queue.getJob(jobId))!;
    if (state === "failed") throw new Error(`the toy flow failed: ${job.failedReason}`);
    return job.returnvalue as Record<string, FlowValue>;
  }, 240_000, 100);
}

/** Sums by the standard identities: sum k^2 = M(M+1)(2M+1)/6, sum k^3 = (M(M+1)/2)^2. */
function expectedValues(m: number) {
  const squares = (m * (m + 1) * (2 * m + 1)) / 6;
  const cubeParts = 3 + (squares % 4);
  return { squares, combine: squares, cubes: ((m * (m + 1)) / 2) ** 2 + cubeParts * squares, cubeParts };
}

/** Each logged execution: what ran ("part squares/3", "step combine", ...) and in which process. */
async function executions(runId: string): Promise<Map<string, number[]>> {
  const out = new Map<string, number[]>();
  for (const line of await redis.lrange(toyKeys(runId).log, 0, -1)) {
    const cut = line.lastIndexOf(" ");
    const what = line.slice(0, cut);
    out.set(what, [...(out.get(what) ?? []), Number(line.slice(cut + 1))]);
  }
  return out;
}

/** The results the parent holds for one step, by part index (read the way the flow reads them). */
async function partResults(jobId: string, step: string): Promise<Map<number, FlowValue>> {
  const job = (await queue.getJob(jobId))!;
  const prefix = partIdPrefix(job, step);
  const out = new Map<number, FlowValue>();
  for (const [key, value] of Object.entries(await job.getChildrenValues<FlowValue>())) {
    const id = key.slice(key.lastIndexOf(":") + 1);
    if (id.startsWith(prefix)) out.set(Number(id.slice(prefix.length)), value);
  }
  return out;
}

/** Waits for the toy to stop at `point` and kills the process that stopped there. */
async function killWhereStopped(runId: string, point: string): Promise<OwnProcess> {
  const pid = await waitFor(`the toy to stop at ${point}`, async () => {
    const text = await redis.get(toyKeys(runId).stopped(point));
    return text ? Number(text) : undefined;
  }, 120_000, 50);
  const victim = running.find((p) => p.pid === pid);
  if (!victim) throw new Error(`process ${pid} that stopped at ${point} is not one of ours`);
  await victim.kill("SIGKILL");
  return victim;
}

const M = 1200;
const SLICES = 12;

/** The flow's answer is exact, and each step's parts hold exactly one result per index. */
async function expectExactResult(jobId: string, values: Record<string, FlowValue>) {
  const want = expectedValues(M);
  expect(values).toEqual({ squares: want.squares, combine: want.combine, cubes: want.cubes });
  const squares = await partResults(jobId, "squares");
  expect([...squares.keys()].sort((a, b) => a - b)).toEqual(Array.from({ length: SLICES }, (_, i) => i));
  const cubes = await partResults(jobId, "cubes");
  expect(cubes.size).toBe(want.cubeParts);
}

function expectRanOnce(runs: Map<string, number[]>, what: string[]) {
  for (const w of what) expect(runs.get(w)?.length, `${w} ran once`).toBe(1);
}

const squareParts = Array.from({ length: SLICES }, (_, i) => `part squares/${i}`);

describe("a stepped flow", () => {
  it("runs its parts in two worker processes and gives the exact answer, with progress counted per step", async () => {
    const a = await startToyWorker("flow-a");
    const b = await startToyWorker("flow-b");
    // The barrier holds each process's first square part until the other has one too.
    const { runId, jobId } = await startToyRun({ m: M, slices: SLICES, partDelayMs: 100, barrier: 2 });
    const values = await finished(jobId);
    await expectExactResult(jobId, values);

    const runs = await executions(runId);
    const cubeParts = Array.from({ length: expectedValues(M).cubeParts }, (_, i) => `part cubes/${i}`);
    expectRanOnce(runs, [...squareParts, ...cubeParts, "step squares", "step combine", "step cubes"]);
    const partPids = new Set(squareParts.flatMap((w) => runs.get(w)!));
    expect(partPids).toEqual(new Set([a.pid, b.pid]));
    // Each part's time is in the log of the process that ran it, once, and the parent's own steps too.
    const times = parseStepTimes((await a.readLog()) + (await b.readLog())).filter((t) => t.parentId === jobId);
    const squareTimes = times.filter((t) => t.step === "squares" && t.what !== "run");
    expect(squareTimes.map((t) => t.what).sort()).toEqual(Array.from({ length: SLICES }, (_, i) => `part ${i + 1}/${SLICES}`).sort());
    expect(new Set(squareTimes.map((t) => t.pid))).toEqual(new Set([a.pid, b.pid]));
    expect(squareTimes.every((t) => t.endMs >= t.startMs + 100)).toBe(true);
    expect(times.filter((t) => t.what === "run").map((t) => t.step)).toContain("combine");

    // Progress: every count of a step is within 0..total, each part reported, and the step ended at total of total.
    const reports = (await redis.lrange(toyKeys(runId).progress, 0, -1)).map((l) => l.split(" "));
    const squaresReports = reports.filter(([step]) => step === "squares").map(([, done, total]) => [Number(done), Number(total)]);
    expect(squaresReports.every(([done, total]) => total === SLICES && done >= 0 && done <= SLICES)).toBe(true);
    expect(squaresReports.filter(([done]) => done > 0).length).toBeGreaterThanOrEqual(SLICES);
    expect(squaresReports.at(-1)).toEqual([SLICES, SLICES]);
    // The parent's job_runs row, written through the same mirror as every job: done after the last step.
    const row = await waitFor("the mirror to say done", async () => {
      const [r] = await db.select().from(jobRuns).where(eq(jobRuns.id, jobId));
      return r.state === "done" ? r : undefined;
    }, 30_000);
    expect([row.progress, row.error]).toEqual([1, null]);
  }, 300_000);

  it("takes a part whose process was killed again in another process, and counts its slice once", async () => {
    await startToyWorker("part-kill-a");
    await startToyWorker("part-kill-b");
    const { runId, jobId } = await startToyRun({ m: M, slices: SLICES, partDelayMs: 100, stopAt: ["part:squares:3"] });
    const victim = await killWhereStopped(runId, "part:squares:3");
    const values = await finished(jobId);
    await expectExactResult(jobId, values);

    const runs = await executions(runId);
    // Two executions of the killed part: the killed one, then the survivor's; every other part once.
    const killed = runs.get("part squares/3")!;
    expect(killed).toHaveLength(2);
    expect(killed[0]).toBe(victim.pid);
    expect(killed[1]).not.toBe(victim.pid);
    expectRanOnce(runs, [...squareParts.filter((w) => w !== "part squares/3"), "step squares", "step combine", "step cubes"]);
    // BullMQ took it again after the stalled check (not as a failed attempt).
    const parent = (await queue.getJob(jobId))!;
    const part = (await queue.getJob(`${partIdPrefix(parent, "squares")}3`))!;
    expect(await part.getState()).toBe("completed");
    expect(part.stalledCounter).toBe(1);
    expect(part.attemptsMade).toBe(1);
  }, 300_000);

  it("refuses the late result of a part whose process froze past its lock, once another process has done it", async () => {
    await startToyWorker("freeze-a");
    await startToyWorker("freeze-b");
    const { runId, jobId } = await startToyRun({ m: M, slices: SLICES, partDelayMs: 20, holdAt: ["part:squares:3"] });
    const pid = await waitFor("the toy to hold part 3", async () => {
      const text = await redis.get(toyKeys(runId).stopped("part:squares:3"));
      return text ? Number(text) : undefined;
    }, 120_000, 50);
    const frozen = running.find((p) => p.pid === pid)!;
    process.kill(frozen.pid, "SIGSTOP");
    try {
      // The other process takes part 3 once the frozen one's lock has expired, and the flow ends.
      const values = await finished(jobId);
      await expectExactResult(jobId, values);
      const doneRow = await waitFor("the mirror to say done", async () => {
        const [r] = await db.select().from(jobRuns).where(eq(jobRuns.id, jobId));
        return r.state === "done" ? r : undefined;
      }, 30_000);
      // Wake the frozen run: it finishes its work and tries to complete and report.
      await redis.set(toyKeys(runId).release, "1");
      process.kill(frozen.pid, "SIGCONT");
      await waitFor("the frozen run to return", async () => ((await executions(runId)).get("returned squares/3")?.includes(frozen.pid) ? true : undefined), 60_000);
      await waitFor("BullMQ to refuse its completion", async () => (/Missing lock for job/.test(await frozen.readLog()) ? true : undefined), 60_000);

      const runs = await executions(runId);
      expect(runs.get("part squares/3")).toEqual([frozen.pid, expect.any(Number)]);
      expect(runs.get("returned squares/3")).toHaveLength(2);
      // Still one result for slice 3, the same answer, and the parent's row as the finished flow left it.
      const parent = (await queue.getJob(jobId))!;
      const part = (await queue.getJob(`${partIdPrefix(parent, "squares")}3`))!;
      expect(await part.getState()).toBe("completed");
      const from = 301; // slice 3 of 12 of 1..1200: 301..400
      const to = 400;
      expect(part.returnvalue).toBe(((to * (to + 1) * (2 * to + 1)) - ((from - 1) * from * (2 * from - 1))) / 6);
      await expectExactResult(jobId, parent.returnvalue as Record<string, FlowValue>);
      const [after] = await db.select().from(jobRuns).where(eq(jobRuns.id, jobId));
      expect([after.state, after.stage, after.progress]).toEqual([doneRow.state, doneRow.stage, 1]);
    } finally {
      if (frozen.isRunning()) process.kill(frozen.pid, "SIGCONT");
    }
  }, 300_000);

  // Killed in the step that reads the finished parts' results (before that step is recorded as done), or
  // in the next step: the parent resumes at the step it was in, and nothing before it runs again.
  it.each([
    ["after its parts finished, without running them again", "squares"],
    ["in a later step, at that step, without redoing the steps before it", "combine"],
  ])("resumes a parent killed %s", async (_when, step) => {
    await startToyWorker(`parent-kill-${step}-a`);
    await startToyWorker(`parent-kill-${step}-b`);
    const { runId, jobId } = await startToyRun({ m: M, slices: SLICES, partDelayMs: 20, stopAt: [`step:${step}`] });
    const victim = await killWhereStopped(runId, `step:${step}`);
    const values = await finished(jobId);
    await expectExactResult(jobId, values);

    const runs = await executions(runId);
    expectRanOnce(runs, [...squareParts, ...["step squares", "step combine", "step cubes"].filter((w) => w !== `step ${step}`)]);
    const again = runs.get(`step ${step}`)!;
    expect(again).toHaveLength(2);
    expect(again[0]).toBe(victim.pid);
    expect(again[1]).not.toBe(victim.pid);
    expect((await queue.getJob(jobId))!.stalledCounter).toBe(1);
  }, 300_000);

  it("ends with the part's reason when a part fails for good, and calls the flow's failure hook once", async () => {
    await startToyWorker("fail-a");
    const { runId, jobId } = await startToyRun({ m: M, slices: SLICES, partDelayMs: 20, failAt: ["squares:5"] });
    const job = await waitFor("the toy flow to fail", async () => {
      const j = await queue.getJob(jobId);
      const state = await j?.getState();
      if (state === "completed") throw new Error("the toy flow completed despite a failed part");
      return state === "failed" ? j : undefined;
    }, 120_000, 100);
    const reason = `part 6 of ${SLICES} of step "squares" failed: slice 5 is unreadable`;
    expect(job!.failedReason).toBe(reason);
    const runs = await executions(runId);
    expect([...runs.keys()].filter((w) => w.startsWith("failed "))).toEqual([`failed ${reason.replace(/\s+/g, "_")}`]);
    expect(runs.has("step squares")).toBe(false);
    const row = await waitFor("the mirror to say failed", async () => {
      const [r] = await db.select().from(jobRuns).where(inArray(jobRuns.id, [jobId]));
      return r.state === "failed" ? r : undefined;
    }, 30_000);
    expect(row.error).toBe(reason);
  }, 300_000);
});
