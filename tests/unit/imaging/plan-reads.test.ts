// The plan (bracket-plan.ts) of a bracket whose frames are kept on disk reads a
// frame's planes back at every look (lib/reduction-runner/frame-spill.ts puts a
// getter on them). It must look at each frame's planes once to check them, and
// once more only for a frame whose offset it solved anew (linearized again): its
// checks once read the first frame's planes again for every frame of the
// bracket, and each linearization read a frame's planes twice, so that at 24
// megapixels several frames' planes (288 MB each) were in memory at once. When
// the store marks the planes' lengths (types.ts PLANE_LENGTHS), the checks read
// none: at 200 frames of 24 megapixels that was a pass of 29 GB over the disk.
import { describe, expect, it } from "vitest";
import { planBracket } from "@/lib/imaging/bracket-plan";
import { prepareFrame } from "@/lib/imaging/frame-stage";
import { linearizeFrame } from "@/lib/imaging/linearize";
import { createRng } from "@/lib/imaging/random";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { DEFAULT_REDUCTION_PARAMS, markPlaneLengths, type LinearFrame } from "@/lib/imaging/types";

const W = 360, H = 300;
const EXPOSURES = [1 / 1000, 1 / 250, 1 / 60, 1 / 15, 1 / 4];
const PEDESTAL_DN = 64;

/** A bracket whose pedestal the files do not state (so the plan solves every offset), each frame's planes behind a counting getter. */
function makeCountedBracket(): { frames: LinearFrame[]; reads: number[] } {
  const rng = createRng(9);
  const { frames, truth } = synthesizeBracket({
    width: W, height: H, channels: 3, exposuresS: EXPOSURES, sunRadiusPx: 45, seed: 9, blackLevel: PEDESTAL_DN,
    shiftsPx: EXPOSURES.map((_, i) => (i === 2 ? { dx: 0, dy: 0 } : { dx: (rng() - 0.5) * 3, dy: (rng() - 0.5) * 3 })),
  });
  const reads = frames.map(() => 0);
  const counted = frames.map((f, k): LinearFrame => ({
    name: f.name, exposureS: f.exposureS, blackLevel: 0, blackLevelSource: "none", whiteLevel: truth.whiteLevel, encoding: "linear",
    image: {
      width: W, height: H,
      // A copy at every look, as a spilled frame's getter gives.
      get planes() {
        reads[k]++;
        return f.planes.map((p) => Float32Array.from(p));
      },
    },
  }));
  return { frames: counted, reads };
}

describe("planning a bracket kept on disk", () => {
  it("reads each frame's planes once to check them, and once more only where it linearizes the frame again", () => {
    const { frames, reads } = makeCountedBracket();
    // Prepared beforehand, as the runner's worker threads do (they read the files themselves).
    const prepared = frames.map((f) => prepareFrame(f, DEFAULT_REDUCTION_PARAMS));
    expect(reads).toEqual(frames.map(() => 1));
    reads.fill(0);
    const { plan } = planBracket(frames, prepared, DEFAULT_REDUCTION_PARAMS);
    const again = plan.offsets.map((o, k) => (o.blackLevel !== frames[k].blackLevel ? 1 : 0));
    // The pedestal is found in the data (to within its noise), so every frame is linearized again here.
    for (const o of plan.offsets) expect(Math.abs(o.blackLevel - PEDESTAL_DN)).toBeLessThan(1);
    expect(again).toEqual(frames.map(() => 1));
    expect(reads).toEqual(again.map((a) => 1 + a));
    expect(plan.channels).toBe(3);
  });

  it("checks the frames from their planes' lengths alone when the store gives them, and reads only to linearize again", () => {
    const { frames, reads } = makeCountedBracket();
    // As frame-spill.ts and the flow's work files mark an image whose planes wait on disk.
    for (const f of frames) markPlaneLengths(f.image, [W * H, W * H, W * H]);
    const prepared = frames.map((f) => prepareFrame(f, DEFAULT_REDUCTION_PARAMS));
    reads.fill(0);
    const { plan } = planBracket(frames, prepared, DEFAULT_REDUCTION_PARAMS);
    const again = plan.offsets.map((o, k) => (o.blackLevel !== frames[k].blackLevel ? 1 : 0));
    expect(again).toEqual(frames.map(() => 1));
    expect(reads).toEqual(again);
    // A mark that disagrees with the frame's size is refused by name, still without a read.
    reads.fill(0);
    markPlaneLengths(frames[3].image, [W * H, W * H, W * H - 1]);
    expect(() => planBracket(frames, prepared, DEFAULT_REDUCTION_PARAMS)).toThrow(/plane 2 has 107999 values, expected 360 x 300/);
    expect(reads).toEqual(frames.map(() => 0));
  });

  it("linearizes a frame from one look at its planes, the defects' luminance repaired as before", () => {
    const { frames, reads } = makeCountedBracket();
    const badPixels = new Uint8Array(W * H);
    for (const i of [W * 40 + 50, W * 40 + 51, W * 150 + 180, W * 151 + 181, W * 299 + 359]) badPixels[i] = 1;
    const frame = { ...frames[1], badPixels };
    const linear = linearizeFrame(frame, DEFAULT_REDUCTION_PARAMS.clipFraction, { keepPlanes: false });
    expect(reads[1]).toBe(1);
    // The rule itself, independently: a defect's luminance is the median of its sound 8-neighbours' (upper median of an even count).
    const raw = linearizeFrame({ ...frames[1] }, DEFAULT_REDUCTION_PARAMS.clipFraction, { keepPlanes: false }).luminance;
    for (let i = 0; i < W * H; i++) {
      if (!badPixels[i]) {
        expect(linear.luminance[i]).toBe(raw[i]);
        continue;
      }
      const y = Math.floor(i / W), x = i % W;
      const around: number[] = [];
      for (let v = Math.max(0, y - 1); v <= Math.min(H - 1, y + 1); v++) {
        for (let u = Math.max(0, x - 1); u <= Math.min(W - 1, x + 1); u++) if (!badPixels[v * W + u]) around.push(raw[v * W + u]);
      }
      around.sort((a, b) => a - b);
      expect(linear.luminance[i]).toBe(around[around.length >> 1]);
    }
  });
});
