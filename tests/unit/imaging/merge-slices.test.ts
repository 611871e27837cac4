// Partial merges of slices of a bracket's frames, combined, must give the merge
// of the whole (the basis for merging slices in separate processes): the same
// outliers taken out, the same per-frame records, radiance equal up to the order
// of float32 additions.
import { describe, expect, it } from "vitest";
import { addFrameToMerge, combineMergeAccumulators, createMergeAccumulator, finishMerge, toPilot, type MergeAccumulator, type MergeFrameInput } from "@/lib/imaging/merge";
import { prepareFrame, warpFrameForMerge } from "@/lib/imaging/pipeline";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { DEFAULT_REDUCTION_PARAMS } from "@/lib/imaging/types";

const W = 200, H = 160;
const EXPOSURES = [1 / 500, 1 / 500, 1 / 125, 1 / 125, 1 / 30, 1 / 30, 1 / 8];

function makeInputs(): MergeFrameInput[] {
  const { frames, truth } = synthesizeBracket({
    width: W, height: H, channels: 3, exposuresS: EXPOSURES, sunRadiusPx: 30, seed: 21,
    trail: { frame: 3, from: { x: 0, y: 30 }, to: { x: 199, y: 140 }, sigmaPx: 1, peakDn: 3000 },
  });
  const identity = { a: 1, b: 0, tx: 0, ty: 0 };
  return frames.map((f) => {
    const linear = { name: f.name, image: { width: W, height: H, planes: f.planes }, exposureS: f.exposureS, blackLevel: truth.blackLevel, whiteLevel: truth.whiteLevel, encoding: "linear" as const };
    const prepared = prepareFrame(linear, DEFAULT_REDUCTION_PARAMS);
    const moon = { x: prepared.limb.x, y: prepared.limb.y, radiusPx: prepared.limb.radiusPx };
    return warpFrameForMerge(linear, prepared, identity, moon, moon);
  });
}

function mergeAll(inputs: MergeFrameInput[], pilot?: ReturnType<typeof toPilot>): MergeAccumulator {
  const acc = createMergeAccumulator(W, H, 3, "photon", undefined, pilot);
  for (const f of inputs) addFrameToMerge(acc, f);
  return acc;
}

describe("merging a bracket in slices", () => {
  const inputs = makeInputs();

  it("gives the one-pass merge, outliers and per-frame records included", () => {
    const pilotWhole = toPilot(mergeAll(inputs));
    const pilotParts = toPilot(combineMergeAccumulators([mergeAll(inputs.slice(0, 3)), mergeAll(inputs.slice(3, 5)), mergeAll(inputs.slice(5))]));
    // The pilot itself: sums equal up to float32 rounding of a different addition order.
    for (let c = 0; c < 3; c++) {
      for (let i = 0; i < W * H; i++) expect(Math.abs(pilotParts.sums[c][i] - pilotWhole.sums[c][i])).toBeLessThanOrEqual(1e-6 * Math.abs(pilotWhole.sums[c][i]) + 1e-6);
    }
    const wholeAcc = mergeAll(inputs, pilotWhole);
    const slicedAcc = combineMergeAccumulators([mergeAll(inputs.slice(0, 2), pilotWhole), mergeAll(inputs.slice(2, 6), pilotWhole), mergeAll(inputs.slice(6), pilotWhole)]);
    // The worst-frame record: the same pixels, frames and scores; listed once each, in master order, only above the wings' threshold.
    const record = wholeAcc.worst!;
    expect(Array.from(slicedAcc.worst!.pixel)).toEqual(Array.from(record.pixel));
    expect(Array.from(slicedAcc.worst!.frame)).toEqual(Array.from(record.frame));
    expect(Array.from(slicedAcc.worst!.score)).toEqual(Array.from(record.score));
    for (let j = 1; j < record.pixel.length; j++) expect(record.pixel[j]).toBeGreaterThan(record.pixel[j - 1]);
    expect(Math.min(...record.score)).toBeGreaterThan(2.5);
    // The trail's frame is listed along the trail; the record holds a small share of the pixels.
    expect(record.frame.filter((f) => f === 3).length).toBeGreaterThan(100);
    expect(record.pixel.length).toBeLessThan(0.2 * W * H);
    const whole = finishMerge(wholeAcc);
    const sliced = finishMerge(slicedAcc);
    expect(sliced.frameStats).toEqual(whole.frameStats);
    // The trail's frame lost pixels to the outlier test (so the test exercises it), the same in both.
    expect(whole.frameStats[3].rejectedFraction).toBeGreaterThan(0.005);
    expect(Array.from(sliced.coverage)).toEqual(Array.from(whole.coverage));
    let worst = 0;
    for (let c = 0; c < 3; c++) {
      for (let i = 0; i < W * H; i++) {
        const a = whole.radiance[c][i], b = sliced.radiance[c][i];
        worst = Math.max(worst, Math.abs(a - b) / Math.max(Math.abs(a), 1e-3));
      }
    }
    // Stated tolerance: 1e-5 relative (float32 sums of up to seven frames in another order).
    expect(worst).toBeLessThan(1e-5);
  });

  it("refuses parts that do not belong together", () => {
    const first = createMergeAccumulator(W, H, 3, "photon");
    expect(() => combineMergeAccumulators([first, createMergeAccumulator(W, H + 1, 3, "photon")])).toThrow(/differ in size/);
    expect(() => combineMergeAccumulators([])).toThrow(/nothing to combine/);
  });
});
