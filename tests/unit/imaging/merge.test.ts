import { describe, expect, it } from "vitest";
import { addFrameToMerge, computeHatWeight, createMergeAccumulator, finishMerge, mergeCodesDebevec, mergeCodesLikeOpenCv, mergeFrames, toPilot, type MergeFrameInput } from "@/lib/imaging/merge";
import { convertResponseToTable, createCodeLookup, recoverResponseCurve, selectResponseSamples } from "@/lib/imaging/response";
import { ImagingError } from "@/lib/imaging/errors";
import { createRng } from "@/lib/imaging/random";

const LINEAR_RESPONSE = Float64Array.from({ length: 256 }, (_, z) => z);

describe("linear merge, photon-limited weights", () => {
  it("gives exactly 2.000e6 DN/s for y = (2000, 8000, clipped) at t = (1/1000, 1/250, 1/60) (computed, REFERENCES.md)", () => {
    const clipAt = 16383;
    const exposures = [1 / 1000, 1 / 250, 1 / 60];
    const frames: MergeFrameInput[] = exposures.map((t) => {
      const y = Math.min(2e6 * t, clipAt);
      return {
        planes: [Float32Array.of(y)],
        exposureS: t,
        clipped: Uint8Array.of(y >= 0.92 * clipAt ? 1 : 0),
        noiseFloor: Uint8Array.of(0),
        clipLevel: 0.92 * clipAt,
      };
    });
    const result = mergeFrames(frames, 1, 1);
    expect(result.radiance[0][0]).toBe(2e6);
    expect(result.coverage[0]).toBe(2);
    expect(result.poorlyExposedCount).toBe(0);
    expect(result.frameStats[2].contributingFraction).toBe(0);
    expect(result.frameStats[1].weightShare).toBeCloseTo(0.8, 12);
  });

  it("falls back to a lower bound and counts the pixel when every frame clipped or sat in the noise floor", () => {
    const frames: MergeFrameInput[] = [0.01, 0.1].map((t) => ({
      planes: [Float32Array.of(1000, 2)],
      exposureS: t,
      clipped: Uint8Array.of(1, 0),
      noiseFloor: Uint8Array.of(0, 1),
      clipLevel: 1000,
    }));
    const result = mergeFrames(frames, 2, 1);
    expect(result.radiance[0][0]).toBeCloseTo(1000 / 0.01, 6);
    expect(result.radiance[0][1]).toBeCloseTo(4 / 0.11, 5);
    expect(result.poorlyExposedCount).toBe(2);
  });
});

describe("the merge's memory at the end of a pass", () => {
  // Two frames of 3 pixels, the second twice as long; pixel 2 clipped in the second.
  const frames: MergeFrameInput[] = [0.001, 0.002].map((t, k) => ({
    planes: [Float32Array.of(10 * (k + 1), 100 * (k + 1), 1000 * (k + 1))],
    exposureS: t,
    clipped: Uint8Array.of(0, 0, k),
    noiseFloor: Uint8Array.of(0, 0, 0),
    clipLevel: 1500,
  }));
  const passOf = (pilot?: ReturnType<typeof toPilot>) => {
    const acc = createMergeAccumulator(3, 1, 1, "photon", undefined, pilot);
    for (const f of frames) addFrameToMerge(acc, f);
    return acc;
  };

  it("the pilot's exposure weights are the first pass's, rounded once to float32", () => {
    const first = passOf();
    const pilot = toPilot(first);
    expect(pilot.weights).toBeInstanceOf(Float32Array);
    expect(pilot.sums).toBe(first.sums);
    // 0.001 + 0.002 in float64 is not a float32 number: the pilot holds its nearest float32.
    expect(first.weights[0][0]).toBe(0.001 + 0.002);
    expect(pilot.weights[0]).toBe(Math.fround(0.001 + 0.002));
  });

  it("finishMerge turns the sums into the radiance in place and lets the rest of the accumulator go", () => {
    const acc = passOf(toPilot(passOf()));
    const sums = acc.sums[0];
    expect(acc.worst).toBeDefined();
    const result = finishMerge(acc);
    expect(result.radiance[0]).toBe(sums);
    // Pixel 0: 10 + 20 DN over 0.003 s, both frames well inside the taper's flat part.
    expect(result.radiance[0][0]).toBeCloseTo(30 / 0.003, 2);
    expect(result.radiance[0][2]).toBeCloseTo(1000 / 0.001, 2);
    expect(acc.sums).toEqual([]);
    expect(acc.weights).toEqual([]);
    expect(acc.fallback.length).toBe(0);
    expect(acc.pilot).toBeUndefined();
    expect(acc.worst).toBeUndefined();
    expect(acc.useScratch).toBeUndefined();
    expect(result.coverage).toBe(acc.coverage);
  });
});

describe("the outlier record over many frames", () => {
  it("grows with the outliers, not with the frames: 60 frames of noise and one trail", () => {
    // 60 equal exposures of a flat field at 900 counts, photon noise (sigma 30), and a trail of
    // 40 px in frame 17 at +50 % with +15 % wings. Under the normal law about 1.2 % of a frame's
    // pixels pass 2.5 sigma by chance, so nearly every pixel has some frame past it.
    const width = 64, height = 48, n = width * height, frames = 60;
    const make = (seed: number): MergeFrameInput[] => {
      const rng = createRng(seed);
      return Array.from({ length: frames }, (_, f) => {
        const plane = Float32Array.from({ length: n }, () => 900 + 30 * 2 * (rng() + rng() + rng() - 1.5));
        if (f === 17) {
          for (let x = 12; x < 52; x++) {
            plane[20 * width + x] *= 1.5;
            plane[19 * width + x] *= 1.15;
            plane[21 * width + x] *= 1.15;
          }
        }
        return { planes: [plane], exposureS: 0.01, clipped: new Uint8Array(n), noiseFloor: new Uint8Array(n), clipLevel: 6e4, noiseSigma: 2 };
      });
    };
    const first = createMergeAccumulator(width, height, 1, "photon");
    for (const f of make(3)) addFrameToMerge(first, f);
    const second = createMergeAccumulator(width, height, 1, "photon", undefined, toPilot(first));
    for (const f of make(3)) addFrameToMerge(second, f);
    const worst = second.worst!;
    const trail = new Set(Array.from({ length: 40 }, (_, k) => 20 * width + 12 + k));
    // Every pixel of the trail's core is listed, for its frame.
    for (const i of trail) {
      const j = worst.pixel.indexOf(i);
      expect(j).toBeGreaterThanOrEqual(0);
      expect(worst.frame[j]).toBe(17);
    }
    // Outside the trail and its 2 px reach, only chance scores above 5 sigma (a handful at most).
    const far = Array.from(worst.pixel).filter((i) => Math.abs(Math.floor(i / width) - 20) > 2 || i % width < 10 || i % width > 53);
    expect(far.length).toBeLessThan(10);
    expect(worst.pixel.length).toBeLessThan(5 * 44 + 10);
    // The trail comes out of the merge: the core's radiance is the flat field's (9e4 DN/s) within 1 %.
    const result = finishMerge(second);
    let core = 0;
    for (const i of trail) core += result.radiance[0][i] / trail.size;
    expect(core).toBeGreaterThan(0.99 * 9e4);
    expect(core).toBeLessThan(1.01 * 9e4);
    expect(result.frameStats[17].rejectedFraction).toBeGreaterThan(40 / n);
  });
});

describe("8-bit merge", () => {
  it("mirrors OpenCV MergeDebevec: Z = (64, 128, 255), t = (0.25, 0.5, 1) -> E = 255.99484 (computed from its source, REFERENCES.md)", () => {
    const e = mergeCodesLikeOpenCv([[64], [128], [255]], [0.25, 0.5, 1.0], LINEAR_RESPONSE);
    expect(e[0]).toBeCloseTo(255.99484, 3);
  });

  it("Debevec-Malik hat weights recover the radiance from a linear response exactly where unclipped", () => {
    const logResponse = Float64Array.from(LINEAR_RESPONSE, (v) => Math.log(Math.max(v, 1e-9)));
    const e = mergeCodesDebevec([[20], [80], [255]], [0.25, 1, 4], logResponse);
    expect(e[0]).toBeCloseTo(80, 9);
    expect(computeHatWeight(0)).toBe(0);
    expect(computeHatWeight(255)).toBe(0);
  });

  it("refuses mismatched exposures and codes outside 0..255", () => {
    expect(() => mergeCodesLikeOpenCv([[1], [2]], [1], LINEAR_RESPONSE)).toThrow(/one exposure per frame/);
    expect(() => mergeCodesLikeOpenCv([[1], [300]], [1, 2], LINEAR_RESPONSE)).toThrow(/code 300/);
    expect(() => mergeCodesLikeOpenCv([[1], [3]], [1, 0], LINEAR_RESPONSE)).toThrow(ImagingError);
  });
});

describe("camera response recovery (Debevec and Malik 1997)", () => {
  it("recovers a gamma 2.2 response from a smooth synthetic 8-bit bracket", () => {
    const width = 200;
    const height = 120;
    const exposures = [1 / 16, 1 / 4, 1, 4];
    // A smooth scene spanning about 12 stops, left to right, with a gentle vertical term.
    const radiance = new Float64Array(width * height);
    for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) radiance[y * width + x] = Math.pow(2, -10 + (12 * x) / (width - 1) + y / height);
    const trueInverse = (z: number) => Math.pow(z / 255, 2.2); // f^-1: code -> relative exposure
    const codes = exposures.map((t) => Uint8Array.from(radiance, (e) => Math.round(255 * Math.pow(Math.min(1, e * t), 1 / 2.2))));
    const samples = selectResponseSamples(codes[2], width, height, 70);
    expect(samples.length).toBe(70);
    const g = recoverResponseCurve(Array.from(codes), exposures, samples, 10);
    expect(g[128]).toBeCloseTo(0, 6);
    let worst = 0;
    for (let z = 12; z <= 245; z++) worst = Math.max(worst, Math.abs(g[z] - (Math.log(trueInverse(z)) - Math.log(trueInverse(128)))));
    // Rounding to codes limits the low end: 12 codes carry about 4 % quantization error.
    expect(worst).toBeLessThan(0.06);
    const table = convertResponseToTable(g);
    const codeOf = createCodeLookup(table);
    for (const z of [5, 64, 128, 200, 254]) expect(codeOf(table[z])).toBe(z);
  });

  it("refuses a single frame or a negative lambda", () => {
    expect(() => recoverResponseCurve([[1, 2]], [1], Int32Array.of(0, 1))).toThrow(/2 or more frames/);
    expect(() => recoverResponseCurve([[1, 2], [2, 4]], [1, 2], Int32Array.of(0, 1), -1)).toThrow(/lambda/);
  });
});
