// A frame warped and merged band by band (bracket-finish.ts addKeptFrame, which keeps
// a 24-megapixel merge's per-frame buffers to a few rows) must give exactly what the
// whole frame gives: the same radiance, coverage and per-frame records bit for bit,
// outliers included. Checked on a bracket with pointing errors (so every frame is
// warped), a satellite trail (so the outlier test takes pixels out) and hot pixels
// found in the bracket (so defects are repaired for the warp and put back after).
// The same with each band's rows shared among a plane pool's threads
// (addKeptFrameOnRunner), every row through a worker or shared with the caller.
import { afterAll, describe, expect, it } from "vitest";
import { addKeptFrame, addKeptFrameOnRunner, createMergePass, createRowWarpScratch, createWarpScratch, releaseRowWarpScratch, type WarpCache } from "@/lib/imaging/bracket-finish";
import type { PlaneRunner } from "@/lib/imaging/plane-runner";
import { createPlanePool, type PlanePool } from "@/lib/reduction-runner/plane-pool";
import { planBracket } from "@/lib/imaging/bracket-plan";
import { addFrameToMerge, finishMerge, toPilot, type MergeAccumulator, type MergeResult } from "@/lib/imaging/merge";
import { warpFrameForMerge } from "@/lib/imaging/pipeline";
import { createRng } from "@/lib/imaging/random";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { DEFAULT_REDUCTION_PARAMS, type LinearFrame } from "@/lib/imaging/types";
import { calibrateBracket } from "@/lib/reduction-runner/calibration";

// Over 400 000 pixels, so that the outlier scale samples every third pixel (a stride the bands must keep: 722 is no multiple of 3, so bands start between samples).
const W = 722, H = 600;
const EXPOSURES = [1 / 2000, 1 / 500, 1 / 125, 1 / 125, 1 / 30, 1 / 8, 1 / 2];

function makeBracket(): LinearFrame[] {
  const rng = createRng(4);
  const { frames, truth } = synthesizeBracket({
    width: W, height: H, channels: 3, exposuresS: EXPOSURES, sunRadiusPx: 90, seed: 4,
    shiftsPx: EXPOSURES.map((_, i) => (i === 3 ? { dx: 0, dy: 0 } : { dx: (rng() - 0.5) * 4, dy: (rng() - 0.5) * 4 })),
    rotationsDeg: EXPOSURES.map((_, i) => (i === 3 ? 0 : (rng() - 0.5) * 0.3)),
    trail: { frame: 2, from: { x: 0, y: 60 }, to: { x: W - 1, y: 420 }, sigmaPx: 1, peakDn: 3000 },
    sensorDefects: Array.from({ length: 16 }, (_, k) => (k % 2
      ? { kind: "hot" as const, x: 6 + Math.floor(rng() * (W - 12)), y: 6 + Math.floor(rng() * (H - 12)), dnPerS: 20_000 }
      : { kind: "stuck" as const, x: 6 + Math.floor(rng() * (W - 12)), y: 6 + Math.floor(rng() * (H - 12)), levelDn: 9000 })),
  });
  const linear: LinearFrame[] = frames.map((f) => ({
    name: f.name, image: { width: W, height: H, planes: f.planes }, exposureS: f.exposureS,
    blackLevel: truth.blackLevel, blackLevelSource: "file", whiteLevel: truth.whiteLevel, encoding: "linear",
  }));
  calibrateBracket(linear, undefined);
  return linear;
}

function expectSameMerge(a: MergeResult, b: MergeResult): void {
  expect(b.frameStats).toEqual(a.frameStats);
  expect(Buffer.from(b.coverage.buffer).equals(Buffer.from(a.coverage.buffer))).toBe(true);
  for (let c = 0; c < a.radiance.length; c++) expect(Buffer.from(b.radiance[c].buffer).equals(Buffer.from(a.radiance[c].buffer)), `plane ${c}`).toBe(true);
}

/** A WarpCache in memory with room for `frames` frames; counts the frames whose sample part was read. */
function createMemoryWarpCache(frames: number): WarpCache & { taken: number; left: () => number } {
  const parts = new Map<string, (Float32Array | Uint8Array)[]>();
  let room = frames;
  const cache = {
    taken: 0,
    left: () => parts.size,
    reserve: () => room-- > 0,
    put: (position: number, part: number, arrays: (Float32Array | Uint8Array)[]) => {
      parts.set(`${position}-${part}`, arrays.map((a) => a.slice()));
      return true;
    },
    take: (position: number, part: number, into: (Float32Array | Uint8Array)[]) => {
      const kept = parts.get(`${position}-${part}`);
      if (!kept) return undefined;
      parts.delete(`${position}-${part}`);
      if (part === 0) cache.taken++;
      kept.forEach((a, j) => into[j].set(a));
      return kept.map((a) => a.length);
    },
  };
  return cache;
}

describe("merging a frame band by band", () => {
  const frames = makeBracket();
  const { plan, ready } = planBracket(frames, [], DEFAULT_REDUCTION_PARAMS);
  // Both passes with each frame added by `add`.
  // Both passes with each frame added by `add`; the outlier scores as they stood before the finish.
  const mergeWith = (add: (acc: MergeAccumulator, position: number) => void, runner?: PlaneRunner): MergeResult & { scores: Float32Array; pixels: Int32Array } => {
    const first = createMergePass(plan, undefined, runner);
    plan.keep.forEach((_, i) => add(first, i));
    const second = createMergePass(plan, toPilot(first, runner), runner);
    plan.keep.forEach((_, i) => add(second, i));
    const { score, pixel } = second.worst!;
    return { ...finishMerge(second), scores: Float32Array.from(score), pixels: Int32Array.from(pixel) };
  };

  it("gives the whole-frame merge bit for bit, with bands of any height", () => {
    const before = frames.map((f) => f.image.planes.map((p) => Float32Array.from(p)));
    expect(plan.keep.length).toBe(EXPOSURES.length);
    expect(plan.registration.filter((r) => r.masterToFrame.tx !== 0 || r.masterToFrame.a !== 1).length).toBeGreaterThan(3);
    expect(frames.some((f) => f.badPixels && f.badPixels.some((v) => v))).toBe(true);
    const plain = mergeWith((acc, i) => {
      const M = plan.registration[i].masterToFrame;
      addFrameToMerge(acc, warpFrameForMerge(frames[plan.keep[i]], ready[i], M, plan.moons[i], plan.referenceMoon, undefined, plan.effectiveExposuresS[i]));
    });
    // The trail's frame lost pixels to the outlier test, so the scores' sample and scale are exercised.
    expect(plain.frameStats[2].rejectedFraction).toBeGreaterThan(0.003);
    for (const rows of [H, 64, 7, 1]) {
      const scratch = createWarpScratch(plan, rows);
      expect(scratch.planes[0].length).toBe(rows * W);
      const banded = mergeWith((acc, i) => addKeptFrame(plan, acc, i, frames[plan.keep[i]], ready[i], scratch));
      expectSameMerge(plain, banded);
      // The worst-frame record itself (pixels and scores), so that a frame's z scale measured on another sample would show.
      expect(Buffer.from(banded.pixels.buffer).equals(Buffer.from(plain.pixels.buffer)), `${rows} rows`).toBe(true);
      expect(Buffer.from(banded.scores.buffer).equals(Buffer.from(plain.scores.buffer)), `${rows} rows`).toBe(true);
    }
    // The second pass reading the bands the first pass kept (and warping again the frames the cache had no room for) gives the same.
    for (const roomFor of [Infinity, 3]) {
      const scratch = createWarpScratch(plan, 64);
      const cache = createMemoryWarpCache(roomFor);
      const cached = mergeWith((acc, i) => addKeptFrame(plan, acc, i, frames[plan.keep[i]], ready[i], scratch, cache));
      expectSameMerge(plain, cached);
      expect(Buffer.from(cached.scores.buffer).equals(Buffer.from(plain.scores.buffer)), `room for ${roomFor} frames`).toBe(true);
      expect(cache.taken, `room for ${roomFor} frames`).toBe(Math.min(roomFor, EXPOSURES.length));
      expect(cache.left(), "every part kept was read once").toBe(0);
    }
    // The defects the warp repaired were put back: the frames are as they came.
    frames.forEach((f, i) => f.image.planes.forEach((p, c) => expect(Buffer.from(p.buffer).equals(Buffer.from(before[i][c].buffer)), `${f.name} plane ${c}`).toBe(true)));
  });

  const pools: PlanePool[] = [];
  afterAll(async () => {
    await Promise.all(pools.map((p) => p.close()));
  });

  it("gives the same with each band's rows shared among threads, cached or not", async () => {
    const before = frames.map((f) => f.image.planes.map((p) => Float32Array.from(p)));
    const plain = mergeWith((acc, i) => addKeptFrame(plan, acc, i, frames[plan.keep[i]], ready[i], createWarpScratch(plan, 64)));
    for (const callerWorks of [false, true]) {
      const pool = createPlanePool({ callerWorks });
      pools.push(pool);
      expect(await pool.ready()).toBe(1);
      for (const [rows, roomFor] of [[64, 0], [7, Infinity], [H, 3]] as const) {
        const scratch = createRowWarpScratch(plan, pool, rows);
        const cache = roomFor > 0 ? createMemoryWarpCache(roomFor) : undefined;
        const shared = mergeWith((acc, i) => addKeptFrameOnRunner(plan, acc, i, frames[plan.keep[i]], ready[i], scratch, pool, cache), pool);
        releaseRowWarpScratch(scratch, pool);
        const label = `${rows} rows, ${callerWorks ? "caller and worker" : "worker alone"}, room for ${roomFor} frames`;
        expect(Buffer.from(shared.coverage.buffer).equals(Buffer.from(plain.coverage.buffer)), label).toBe(true);
        for (let c = 0; c < plain.radiance.length; c++) expect(Buffer.from(shared.radiance[c].buffer).equals(Buffer.from(plain.radiance[c].buffer)), `${label}: plane ${c}`).toBe(true);
        expect(Buffer.from(shared.pixels.buffer).equals(Buffer.from(plain.pixels.buffer)), label).toBe(true);
        expect(Buffer.from(shared.scores.buffer).equals(Buffer.from(plain.scores.buffer)), label).toBe(true);
        // The frame's weight adds up row by row: its share may differ from the serial sum's in the last bits alone.
        shared.frameStats.forEach((s, i) => {
          const { weightShare, ...rest } = plain.frameStats[i];
          expect({ ...s, weightShare: undefined }, label).toEqual({ ...rest, weightShare: undefined });
          expect(Math.abs(s.weightShare - weightShare), label).toBeLessThan(1e-12);
        });
        if (cache) expect(cache.left(), `${label}: every part kept was read once`).toBe(0);
      }
      // Every row went through a thread of the pool at least once.
      expect(pool.counts().byWorkers).toBeGreaterThan(0);
    }
    frames.forEach((f, i) => f.image.planes.forEach((p, c) => expect(Buffer.from(p.buffer).equals(Buffer.from(before[i][c].buffer)), `${f.name} plane ${c}`).toBe(true)));
  }, 120_000);
});
