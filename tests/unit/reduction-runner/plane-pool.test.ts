// The renditions' plane pool gives the same renditions and figures bit for bit as
// the calling thread alone: with its worker taking every piece, with the caller
// and the worker sharing them, and with no worker at all. The frame is a
// synthetic corona with a lunar disk (a 3-colour bracket of our own generator,
// planned and merged as a reduction does) whose sides, 203 x 149 px, divide
// into no run's pieces evenly, so a piece that missed or repeated a row, a
// column or a pixel at its edge would change the result.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { finishMergedBracket, mergeKeptFrames } from "@/lib/imaging/bracket-finish";
import { planBracket, type BracketPlan } from "@/lib/imaging/bracket-plan";
import { finishMerge, type MergeResult } from "@/lib/imaging/merge";
import { BLUR_ROWS } from "@/lib/imaging/blur";
import { PLANE_KERNELS } from "@/lib/imaging/plane-kernels";
import { SERIAL_PLANE_RUNNER, type PlaneKernel, type PlaneRunner } from "@/lib/imaging/plane-runner";
import type { ReductionResult } from "@/lib/imaging/pipeline";
import { applyMgn } from "@/lib/imaging/radial";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { renderNatural } from "@/lib/imaging/tone";
import { DEFAULT_REDUCTION_PARAMS, type LinearFrame } from "@/lib/imaging/types";
import { createPlanePool, type PlanePool } from "@/lib/reduction-runner/plane-pool";

const W = 203;
const H = 149;

let plan: BracketPlan;
let merged: MergeResult;
let alone: ReductionResult;

beforeAll(() => {
  const { frames, truth } = synthesizeBracket({ width: W, height: H, channels: 3, exposuresS: [1 / 500, 1 / 60, 1 / 8], sunRadiusPx: 34, seed: 21, moonOffsetPx: { dx: 1, dy: -1 } });
  const linear: LinearFrame[] = frames.map((f) => ({
    name: f.name, image: { width: W, height: H, planes: f.planes }, exposureS: f.exposureS,
    blackLevel: truth.blackLevel, whiteLevel: truth.whiteLevel, encoding: "linear", captureTimeMs: f.captureTimeMs,
  }));
  const planned = planBracket(linear, [], { ...DEFAULT_REDUCTION_PARAMS, registration: "moon" });
  plan = planned.plan;
  merged = finishMerge(mergeKeptFrames(plan, linear, planned.ready));
  alone = finishMergedBracket(plan, merged);
}, 120_000);

/** Everything the finish returns but its timings, the arrays as plain number lists. */
function figuresOf(result: ReductionResult): unknown {
  const { timingsMs: _timings, ...overall } = result.overall;
  return { overall, frames: result.frames, leftOut: result.leftOut, poorlyExposedCount: result.poorlyExposedCount };
}

function expectSameBits(got: Float32Array[], expected: Float32Array[]): void {
  expect(got.length).toBe(expected.length);
  got.forEach((plane, c) => {
    const a = new Uint32Array(plane.buffer, plane.byteOffset, plane.length);
    const b = new Uint32Array(expected[c].buffer, expected[c].byteOffset, expected[c].length);
    let differing = 0;
    for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) differing++;
    expect(differing, `plane ${c}: values differing in their bits`).toBe(0);
  });
}

function expectSameFinish(result: ReductionResult): void {
  expectSameBits(result.structure.planes, alone.structure.planes);
  expectSameBits(result.natural.planes, alone.natural.planes);
  expectSameBits(result.master.planes, alone.master.planes);
  expect(figuresOf(result)).toEqual(figuresOf(alone));
}

describe("the renditions' plane pool", () => {
  let pools: PlanePool[] = [];
  const open = (options: Parameters<typeof createPlanePool>[0]) => {
    const pool = createPlanePool(options);
    pools.push(pool);
    return pool;
  };
  afterAll(async () => {
    await Promise.all(pools.map((p) => p.close()));
    pools = [];
  });

  it("a realistic frame: a lit corona, a dark lunar disk masked, renditions that are not flat", () => {
    const structure = alone.structure.planes[0];
    let lit = 0;
    for (const v of structure) if (v > 0.05 && v < 0.95) lit++;
    expect(lit).toBeGreaterThan(structure.length / 3);
    // The Moon's centre is masked in the structure rendition.
    const moon = plan.referenceMoon;
    expect(structure[Math.round(moon.y) * W + Math.round(moon.x)]).toBe(0);
    expect(alone.natural.planes).toHaveLength(3);
  });

  it("gives the same renditions and figures with its worker taking every piece (pieces that divide no side evenly)", async () => {
    const pool = open({ workers: 1, callerWorks: false, piecesPerThread: 7 });
    expect(await pool.ready()).toBe(1);
    expectSameFinish(finishMergedBracket(plan, merged, undefined, 0, pool));
    const counts = pool.counts();
    expect(counts.byWorkers).toBeGreaterThan(100);
    expect(counts.byCaller).toBe(0);
    expect(counts.redone).toBe(0);
  }, 120_000);

  it("gives the same with the calling thread and two workers sharing the pieces", async () => {
    const pool = open({ workers: 2, piecesPerThread: 5 });
    expect(await pool.ready()).toBe(2);
    expectSameFinish(finishMergedBracket(plan, merged, undefined, 0, pool));
    expect(pool.counts().byCaller + pool.counts().byWorkers).toBeGreaterThan(100);
  }, 120_000);

  it("gives the same with no worker: the calling thread does every run itself", async () => {
    const pool = open({ workers: 0 });
    expect(await pool.ready()).toBe(0);
    expectSameFinish(finishMergedBracket(plan, merged, undefined, 0, pool));
    expect(pool.counts()).toMatchObject({ byWorkers: 0, byCaller: 0 });
    expect(pool.counts().alone).toBeGreaterThan(20);
  }, 120_000);

  it("gives the same MGN and natural rendition when the planes handed in are not its own (run on the calling thread)", async () => {
    const pool = open({ workers: 1, callerWorks: false });
    await pool.ready();
    const lum = alone.master.planes[1];
    const disk = { ...plan.referenceMoon, radiusPx: plan.referenceMoon.radiusPx + 1 };
    const serial = applyMgn(lum, W, H, { lunarDisk: disk });
    const pooled = applyMgn(lum, W, H, { lunarDisk: disk, runner: pool });
    expectSameBits([pooled.data], [serial.data]);
    expect(pooled.valid).toEqual(serial.valid);
    const ring = { x: plan.referenceMoon.x, y: plan.referenceMoon.y, innerPx: plan.referenceMoon.radiusPx, outerPx: 1.1 * plan.referenceMoon.radiusPx };
    const image = { width: W, height: H, planes: alone.master.planes };
    expectSameBits(renderNatural(image, { limbRing: ring, runner: pool }).image.planes, renderNatural(image, { limbRing: ring }).image.planes);
  }, 60_000);

  it("would see a piece that left out the last unit of its range (the comparison is exact enough to catch it)", () => {
    // A runner cutting each run into 7 pieces as a pool does, but whose pieces stop one unit short.
    const shortPieces: PlaneRunner = {
      ...SERIAL_PLANE_RUNNER,
      run<A>(kernel: PlaneKernel<A>, args: A, units: number) {
        const pieces = Math.min(units, 7);
        for (let k = 0; k < pieces; k++) kernel.run(args, Math.floor((k * units) / pieces), Math.max(Math.floor((k * units) / pieces), Math.floor(((k + 1) * units) / pieces) - 1));
      },
    };
    const broken = finishMergedBracket(plan, merged, undefined, 0, shortPieces);
    expect(() => expectSameBits(broken.structure.planes, alone.structure.planes)).toThrow();
    expect(() => expectSameBits(broken.natural.planes, alone.natural.planes)).toThrow();
  }, 60_000);

  it("knows every kernel the renditions run by its name (a worker finds them there)", () => {
    const names = new Set<string>();
    const recording: PlaneRunner = {
      ...SERIAL_PLANE_RUNNER,
      run(kernel, args, units) {
        names.add(kernel.name);
        SERIAL_PLANE_RUNNER.run(kernel, args, units);
      },
    };
    finishMergedBracket(plan, merged, undefined, 0, recording);
    expect(names.size).toBeGreaterThan(10);
    for (const name of names) expect(PLANE_KERNELS.get(name)?.name, name).toBe(name);
    expect(PLANE_KERNELS.get(BLUR_ROWS.name)).toBe(BLUR_ROWS);
  }, 60_000);

  it("hands out zeroed shared memory, and reuses what was given back only once", () => {
    const pool = open({ workers: 0 });
    const a = pool.float32(1000);
    expect(a.buffer).toBeInstanceOf(SharedArrayBuffer);
    a.fill(7);
    pool.release(a, a);
    const b = pool.float32(1000);
    const c = pool.float32(1000);
    expect(b.buffer).toBe(a.buffer);
    expect(c.buffer).not.toBe(a.buffer);
    expect(b.every((v) => v === 0)).toBe(true);
    // Arrays it did not hand out are left alone.
    const mine = new Float32Array(1000).fill(3);
    pool.release(mine, b.subarray(0, 10));
    expect(pool.float32(1000).buffer).not.toBe(b.buffer);
    expect(mine[0]).toBe(3);
  });
});
