// A toy stepped flow for the tests of lib/queue/stepped-flow.ts, with a known
// exact answer:
//   squares  parts sum k^2 over their slice of 1..M, each writing its partial to a
//            Redis hash keyed by slice and returning it; the step adds the returns.
//   combine  adds the partials from the hash (what the parts wrote) and stores the
//            total where the next parts read it.
//   cubes    3 + (S2 mod 4) parts, a count fixed by step 2's value: each reads S2
//            and returns S2 + the sum of k^3 over its slice; the step adds them.
// Closed forms (standard identities): sum k^2 = M(M+1)(2M+1)/6, sum k^3 = (M(M+1)/2)^2.
// Every execution of a part or a step is logged to a Redis list, so tests can
// count them. A test asks the toy to stop for good at a named point (the first
// time only) so that it can kill the process there.
import { UnrecoverableError } from "bullmq";
import type { Redis } from "ioredis";
import { z } from "zod";
import { defineSteppedFlow, PART_FIELDS, type FlowValue, type PartFields } from "@/lib/queue/stepped-flow";
import type { SteeringContext } from "@/lib/queue/job-context";

export const TOY_QUEUE = "toy-flow";
const RUN_ID = z.string().regex(/^[a-z0-9-]+$/);
export const TOY_JOBS = {
  "toy.run": { queue: TOY_QUEUE, payload: z.object({ runId: RUN_ID }), attempts: 2 },
  "toy.part": { queue: TOY_QUEUE, payload: z.object({ runId: RUN_ID, ...PART_FIELDS }), attempts: 3 },
} as const;

export interface ToyConfig {
  m: number;
  slices: number;
  partDelayMs: number;
  /** Parts of step "squares" wait until this many processes have started one (at most 60 s). */
  barrier?: number;
  /** Points where the first execution stops for good: "part:squares:3", "step:squares", "step:combine". */
  stopAt?: string[];
  /** Points where the first execution waits until the test sets the run's release key: "part:squares:3". */
  holdAt?: string[];
  /** Parts that fail for good (no retry): "squares:5". */
  failAt?: string[];
}

type ToyParent = SteeringContext<{ runId: string }>;
type ToyPart = SteeringContext<{ runId: string } & PartFields>;

export function toyKeys(runId: string) {
  const base = `${process.env.QUEUE_PREFIX ?? "crownlight"}:toy:${runId}`;
  return {
    config: `${base}:config`,
    log: `${base}:log`,
    squares: `${base}:squares`,
    s2: `${base}:s2`,
    pids: `${base}:pids`,
    progress: `${base}:progress`,
    stopped: (point: string) => `${base}:stopped:${point}`,
    release: `${base}:release`,
    all: [`${base}:config`, `${base}:log`, `${base}:squares`, `${base}:s2`, `${base}:pids`, `${base}:progress`, `${base}:release`],
  };
}

async function readConfig(redis: Redis, runId: string): Promise<ToyConfig> {
  const text = await redis.get(toyKeys(runId).config);
  if (!text) throw new Error(`toy run ${runId} has no configuration`);
  return JSON.parse(text) as ToyConfig;
}

/** The slice of 1..m that part `part` of `parts` covers. */
export function sliceOf(m: number, part: number, parts: number): { from: number; to: number } {
  return { from: Math.floor((part * m) / parts) + 1, to: Math.floor(((part + 1) * m) / parts) };
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

async function record(redis: Redis, runId: string, what: string): Promise<void> {
  await redis.rpush(toyKeys(runId).log, `${what} ${process.pid}`);
}

/**
 * Stops here for good (until the test kills this process), or holds until the test releases it, if the
 * test asked so and no run stopped here before.
 */
async function maybeStop(redis: Redis, runId: string, config: ToyConfig, point: string): Promise<void> {
  const stop = config.stopAt?.includes(point);
  if (!stop && !config.holdAt?.includes(point)) return;
  if ((await redis.set(toyKeys(runId).stopped(point), String(process.pid), "NX")) !== "OK") return;
  if (stop) await new Promise(() => {});
  while (!(await redis.exists(toyKeys(runId).release))) await sleep(50);
}

const sum = (values: FlowValue[]) => values.reduce<number>((a, v) => a + (v as number), 0);

export const toyFlow = defineSteppedFlow<ToyParent, ToyPart>({
  partJob: "toy.part",
  partQueue: TOY_QUEUE,
  partAttempts: TOY_JOBS["toy.part"].attempts,
  onProgress: async (ctx, p) => {
    await ctx.redis.rpush(toyKeys(ctx.payload.runId).progress, `${p.step} ${p.done} ${p.total}`);
  },
  onFailed: async (ctx, error) => {
    await record(ctx.redis, ctx.payload.runId, `failed ${error.message.replace(/\s+/g, "_")}`);
  },
  steps: [
    {
      name: "squares",
      parts: async (ctx) => {
        const config = await readConfig(ctx.redis, ctx.payload.runId);
        return Array.from({ length: config.slices }, () => ({ runId: ctx.payload.runId }));
      },
      part: async (ctx) => {
        const { runId, part, parts } = ctx.payload;
        const config = await readConfig(ctx.redis, runId);
        await record(ctx.redis, runId, `part squares/${part}`);
        if (config.barrier) {
          await ctx.redis.sadd(toyKeys(runId).pids, String(process.pid));
          const until = Date.now() + 60_000;
          while ((await ctx.redis.scard(toyKeys(runId).pids)) < config.barrier && Date.now() < until) await sleep(50);
        }
        await maybeStop(ctx.redis, runId, config, `part:squares:${part}`);
        if (config.failAt?.includes(`squares:${part}`)) throw new UnrecoverableError(`slice ${part} is unreadable`);
        await sleep(config.partDelayMs);
        const { from, to } = sliceOf(config.m, part, parts);
        let partial = 0;
        for (let k = from; k <= to; k++) partial += k * k;
        await ctx.redis.hset(toyKeys(runId).squares, String(part), String(partial));
        await record(ctx.redis, runId, `returned squares/${part}`);
        return partial;
      },
      run: async (ctx, results) => {
        const config = await readConfig(ctx.redis, ctx.payload.runId);
        await record(ctx.redis, ctx.payload.runId, "step squares");
        await maybeStop(ctx.redis, ctx.payload.runId, config, "step:squares");
        return sum(results);
      },
    },
    {
      name: "combine",
      run: async (ctx) => {
        const { runId } = ctx.payload;
        const config = await readConfig(ctx.redis, runId);
        await record(ctx.redis, runId, "step combine");
        await maybeStop(ctx.redis, runId, config, "step:combine");
        const stored = await ctx.redis.hgetall(toyKeys(runId).squares);
        if (Object.keys(stored).length !== config.slices) throw new Error(`expected ${config.slices} partials, found ${Object.keys(stored).length}`);
        const s2 = Object.values(stored).reduce((a, v) => a + Number(v), 0);
        await ctx.redis.set(toyKeys(runId).s2, String(s2));
        return s2;
      },
    },
    {
      name: "cubes",
      parts: async (ctx) => Array.from({ length: 3 + ((ctx.values.combine as number) % 4) }, () => ({ runId: ctx.payload.runId })),
      part: async (ctx) => {
        const { runId, part, parts } = ctx.payload;
        const config = await readConfig(ctx.redis, runId);
        await record(ctx.redis, runId, `part cubes/${part}`);
        await sleep(config.partDelayMs);
        const s2 = Number(await ctx.redis.get(toyKeys(runId).s2));
        const { from, to } = sliceOf(config.m, part, parts);
        let partial = 0;
        for (let k = from; k <= to; k++) partial += k * k * k;
        return s2 + partial;
      },
      run: async (ctx, results) => {
        await record(ctx.redis, ctx.payload.runId, "step cubes");
        return sum(results);
      },
    },
  ],
});
