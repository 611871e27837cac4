import { describe, expect, it } from "vitest";
import { computeHatWeight, mergeCodesDebevec, mergeCodesLikeOpenCv, mergeFrames, type MergeFrameInput } from "@/lib/imaging/merge";
import { convertResponseToTable, createCodeLookup, recoverResponseCurve, selectResponseSamples } from "@/lib/imaging/response";
import { ImagingError } from "@/lib/imaging/errors";

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
